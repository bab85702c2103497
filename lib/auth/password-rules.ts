/** Shared by the forms (client) and the schemas (server): no hashing code here. */
export const MIN_PASSWORD_LENGTH = 10;
