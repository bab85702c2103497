/** Runs `fn`, expects it to fail, and returns the messages of the error and its causes joined. */
export async function failureText(fn: () => Promise<unknown>): Promise<string> {
  try {
    await fn();
  } catch (e) {
    const parts: string[] = [];
    let cur: unknown = e;
    while (cur instanceof Error) {
      parts.push(cur.message);
      cur = cur.cause;
    }
    return parts.join(" | ");
  }
  throw new Error("expected the call to fail, but it succeeded");
}
