/**
 * The app as the pages benchmark serves it: `next build` (production), then `next start` on a free
 * loopback port against the benchmark's database, with the mail sender off and no outside service
 * needed. Only the server this module started is ever stopped, by its own pid.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdirSync } from "node:fs";
import { join, resolve } from "node:path";
import { freePort, waitForApp } from "../tests/setup/app-server";

const NEXT = resolve("node_modules/.bin/next");

export function nextBuild(): Promise<void> {
  return new Promise((ok, fail) => {
    // The test suite type-checks on its own (npm run check); the build need not do it again.
    const build = spawn(NEXT, ["build"], { stdio: ["ignore", "inherit", "inherit"], env: { ...process.env, NODE_ENV: "production", TWINLEAF_BUILD_SKIP_TYPECHECK: "1" } });
    build.once("error", fail);
    build.once("exit", (code) => (code === 0 ? ok() : fail(new Error(`next build failed with status ${code}`))));
  });
}

export interface RunningApp {
  baseUrl: string;
  stop(): Promise<void>;
}

/** Starts `next start` on the given database; resolves once the sign-in page answers. */
export async function startApp(databaseUrl: string, dir: string): Promise<RunningApp> {
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  mkdirSync(join(dir, "uploads"), { recursive: true });
  const server: ChildProcess = spawn(NEXT, ["start", "-p", String(port), "-H", "127.0.0.1"], {
    stdio: ["ignore", "ignore", "inherit"],
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATABASE_URL: databaseUrl,
      // Nothing is mailed while the benchmark runs; messages queued by a page would wait in the outbox.
      MAIL_SENDER: "off",
      MAILBOX_DIR: join(dir, "mailbox"),
      UPLOADS_DIR: join(dir, "uploads"),
      TWINLEAF_CLOCK_FILE: join(dir, "clock"),
      APP_URL: baseUrl,
    },
  });
  const stop = () =>
    new Promise<void>((done) => {
      if (server.exitCode !== null || server.signalCode !== null) return done();
      server.once("exit", () => done());
      server.kill("SIGTERM");
      // A server that ignores SIGTERM is ended after 5 s.
      setTimeout(() => server.exitCode === null && server.kill("SIGKILL"), 5000).unref();
    });
  try {
    await waitForApp(baseUrl, server);
  } catch (e) {
    await stop();
    throw e;
  }
  return { baseUrl, stop };
}
