/**
 * The app as the pages benchmark serves it: `next build` (production), then `next start` on a free
 * loopback port against the benchmark's database, with the mail sender off and no outside service
 * needed. Only the server this module started is ever stopped, by its own pid.
 */
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { nextBuild as build, startNextApp, type NextApp } from "../tests/setup/app-server";

export const nextBuild = () => build("show");

export type RunningApp = Pick<NextApp, "baseUrl" | "stop">;

/** Starts `next start` on the given database; resolves once the sign-in page answers. */
export async function startApp(databaseUrl: string, dir: string): Promise<RunningApp> {
  mkdirSync(join(dir, "uploads"), { recursive: true });
  return startNextApp({
    DATABASE_URL: databaseUrl,
    // Nothing is mailed while the benchmark runs; messages queued by a page would wait in the outbox.
    MAIL_SENDER: "off",
    MAILBOX_DIR: join(dir, "mailbox"),
    UPLOADS_DIR: join(dir, "uploads"),
    TWINLEAF_CLOCK_FILE: join(dir, "clock"),
  });
}
