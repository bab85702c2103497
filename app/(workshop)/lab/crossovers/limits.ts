/** Parts one crossover board lists at most; apart from the schemas so the client form loads no zod. */
export const MAX_ROWS = 40;
