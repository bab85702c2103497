/** The one error type that crosses from lib/ to app/: an HTTP status and a message fit for the user. */
export class AppError extends Error {
  constructor(
    public readonly status: number,
    message: string,
    public readonly fieldErrors?: Record<string, string[]>,
  ) {
    super(message);
    this.name = "AppError";
  }
}

export const unauthenticated = () => new AppError(401, "Please sign in again.");
export const forbiddenError = () => new AppError(403, "Your roles do not allow this. Ask an administrator if you need it.");

/** True for SQLite constraint failures, which Drizzle wraps in its own error. */
export function isConstraintError(e: unknown, kind?: "UNIQUE" | "FOREIGN KEY" | "CHECK"): boolean {
  let cur: unknown = e;
  while (cur instanceof Error) {
    const code = (cur as { code?: string }).code ?? "";
    if (code.startsWith("SQLITE_CONSTRAINT") || /constraint failed/i.test(cur.message)) {
      return kind ? cur.message.includes(kind) || code.includes(kind.replace(" ", "")) : true;
    }
    cur = cur.cause;
  }
  return false;
}
