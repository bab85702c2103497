import type { ChildProcess } from "node:child_process";
import { createServer } from "node:net";

/** A TCP port free on 127.0.0.1 now (the OS picks it), for a server started next. */
export function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const srv = createServer();
    srv.once("error", rej);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as { port: number };
      srv.close(() => res(port));
    });
  });
}

/**
 * Waits until the app at `baseUrl` answers its sign-in page (any status below 500); throws if the
 * process exits first or nothing answers within `timeoutMs`.
 */
export async function waitForApp(baseUrl: string, server: ChildProcess, timeoutMs = 60_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (server.exitCode !== null) throw new Error(`the app at ${baseUrl} exited with ${server.exitCode} before it answered`);
    try {
      if ((await fetch(`${baseUrl}/sign-in`, { redirect: "manual" })).status < 500) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`the app did not answer at ${baseUrl} within ${timeoutMs} ms`);
}
