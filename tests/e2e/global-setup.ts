import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { TestProject } from "vitest/node";
import { openClient, openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { seedDemo } from "@/db/seed/seed";
import { startFakeSmtp } from "@/lib/mail/fake-smtp";
import { startPaymentStandIn } from "@/lib/payments/stand-in";
import { freePort, nextBuild, startNextApp, testAppEnv } from "../setup/app-server";

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    mailboxDir: string;
    /** Write an ISO time or "+<ms>" here to move the app's clock (lib/clock.ts). */
    clockFile: string;
    databaseUrl: string;
    /** The payment provider's stand-in (lib/payments/stand-in.ts) the app is pointed at. */
    paymentsUrl: string;
  }
}

export default async function setup(project: TestProject) {
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-e2e-"));
  const databaseUrl = `file:${join(dir, "e2e.db")}`;
  const mailboxDir = join(dir, "mailbox");

  // The build and the demo's seeding run side by side: neither needs the other.
  const built = process.env.E2E_SKIP_BUILD === "1" ? Promise.resolve() : nextBuild();
  const seeded = process.env.E2E_SEEDED_DB;
  if (seeded) {
    // A demo seeded once for every lane (scripts/e2e-lanes.mjs): this lane takes a consistent copy
    // of it (VACUUM INTO), which migrating puts back in WAL mode.
    const source = openClient(`file:${seeded}`);
    await source.execute({ sql: "VACUUM INTO ?", args: [join(dir, "e2e.db")] });
    source.close();
    await migrateDatabase(databaseUrl);
  } else {
    await migrateDatabase(databaseUrl);
    const { client, db } = openDb(databaseUrl);
    await seedDemo(db);
    client.close();
  }
  await built;

  const smtp = await startFakeSmtp({ port: 0, dir: mailboxDir });
  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const payments = await startPaymentStandIn({
    stateFile: join(dir, "fake-payments.json"),
    secretKey: "sk_test_e2e_standin",
    webhookSecret: "whsec_e2e_standin",
    webhookUrl: `${baseUrl}/api/v1/payments/webhook`,
  });
  const app = await startNextApp(testAppEnv({ dir, databaseUrl, smtpPort: smtp.port, paymentsUrl: payments.url, sendIntervalMs: 300 }), port);

  project.provide("baseUrl", baseUrl);
  project.provide("mailboxDir", mailboxDir);
  project.provide("databaseUrl", databaseUrl);
  project.provide("clockFile", join(dir, "clock"));
  project.provide("paymentsUrl", payments.url);

  return async () => {
    await app.stop();
    await smtp.close();
    await payments.close();
  };
}
