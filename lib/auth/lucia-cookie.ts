/** The session cookie name, in a file of its own so the proxy can import it without the database. */
export const SESSION_COOKIE = "twinleaf_session";
