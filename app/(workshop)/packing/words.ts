/** Apart from the schemas, so the client forms that show it load no zod. */
export const LOCATION_HINT = "Where the carton is stored, e.g. Rack B, shelf 2.";
