import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { join, resolve } from "node:path";

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

/** `next build` for production; the test suite type-checks on its own (npm run check), so the build need not. */
export function nextBuild(output: "show" | "hide" = "hide"): Promise<void> {
  return new Promise((ok, fail) => {
    const build = spawn(resolve("node_modules/.bin/next"), ["build"], {
      stdio: ["ignore", output === "show" ? "inherit" : "ignore", "inherit"],
      env: { ...process.env, NODE_ENV: "production", TWINLEAF_BUILD_SKIP_TYPECHECK: "1" },
    });
    build.once("error", fail);
    build.once("exit", (code) => (code === 0 ? ok() : fail(new Error(`next build failed with status ${code}`))));
  });
}

export interface NextApp {
  baseUrl: string;
  server: ChildProcess;
  /** Ends the server (SIGTERM, then SIGKILL after 5 s) and resolves when it has exited. */
  stop(): Promise<void>;
}

/**
 * Serves the last production build with `next start` on 127.0.0.1 (`port`, or a free one), with
 * `env` over this process's environment and APP_URL set to its address; resolves once it answers.
 */
export async function startNextApp(env: Record<string, string>, port?: number): Promise<NextApp> {
  const listenOn = port ?? (await freePort());
  const baseUrl = `http://127.0.0.1:${listenOn}`;
  const server = spawn(resolve("node_modules/.bin/next"), ["start", "-p", String(listenOn), "-H", "127.0.0.1"], {
    stdio: ["ignore", "ignore", "inherit"],
    env: { ...process.env, NODE_ENV: "production", APP_URL: baseUrl, ...env },
  });
  const stop = () =>
    new Promise<void>((done) => {
      if (server.exitCode !== null || server.signalCode !== null) return done();
      server.once("exit", () => done());
      server.kill("SIGTERM");
      setTimeout(() => server.exitCode === null && server.kill("SIGKILL"), 5000).unref();
    });
  try {
    await waitForApp(baseUrl, server);
  } catch (e) {
    await stop();
    throw e;
  }
  return { baseUrl, server, stop };
}

/** The environment the browser tests' servers share: their database, stand-in mail and payments, folders in `dir`. */
export function testAppEnv(o: { dir: string; databaseUrl: string; smtpPort: number; paymentsUrl: string; sendIntervalMs: number }): Record<string, string> {
  return {
    DATABASE_URL: o.databaseUrl,
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(o.smtpPort),
    MAILBOX_DIR: join(o.dir, "mailbox"),
    UPLOADS_DIR: join(o.dir, "uploads"),
    TWINLEAF_CLOCK_FILE: join(o.dir, "clock"),
    MAIL_SEND_INTERVAL_MS: String(o.sendIntervalMs),
    STRIPE_SECRET_KEY: "sk_test_e2e_standin",
    STRIPE_WEBHOOK_SECRET: "whsec_e2e_standin",
    STRIPE_API_BASE: o.paymentsUrl,
  };
}
