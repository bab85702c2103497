// `npm run demo`: everything on a fresh clone. Creates data/, migrates, seeds the invented
// workshop (idempotent), starts the stand-in SMTP server, builds and starts Twinleaf.
import { spawn, spawnSync } from "node:child_process";
import { mkdirSync } from "node:fs";
import { resolve } from "node:path";
import { databaseUrl, openDb } from "../db/index";
import { migrateDatabase } from "../db/migrate";
import { formatSignIns } from "../db/seed/print";
import { SeedRefusedError, seedDemo } from "../db/seed/seed";
import { readMailConfig } from "../lib/mail/config";
import { startFakeSmtp } from "../lib/mail/fake-smtp";

const port = Number(process.env.PORT) || 3000;
const url = databaseUrl();
mkdirSync(resolve("data"), { recursive: true });

await migrateDatabase(url);
const { client, db } = openDb(url);
let users;
try {
  console.log("seeding the invented workshop and its two years of work, if they are not there yet…");
  users = (await seedDemo(db)).users;
} catch (e) {
  if (e instanceof SeedRefusedError) {
    console.error(e.message);
    process.exit(1);
  }
  throw e;
} finally {
  client.close();
}

const mail = readMailConfig();
const smtp = await startFakeSmtp({ port: mail.smtp.port, host: mail.smtp.host, dir: mail.mailboxDir });
console.log(`stand-in SMTP server on ${mail.smtp.host}:${smtp.port}, keeping mail in ${mail.mailboxDir}`);

const next = resolve("node_modules/.bin/next");
if (process.env.DEMO_SKIP_BUILD !== "1") {
  console.log("building Twinleaf (about half a minute)…");
  const build = spawnSync(next, ["build"], { stdio: "inherit", env: process.env });
  if (build.status !== 0) {
    await smtp.close();
    process.exit(build.status ?? 1);
  }
}

const appUrl = process.env.APP_URL || `http://localhost:${port}`;
const server = spawn(next, ["start", "-p", String(port)], {
  stdio: "inherit",
  env: { ...process.env, DATABASE_URL: url, SMTP_HOST: mail.smtp.host, SMTP_PORT: String(smtp.port), MAILBOX_DIR: mail.mailboxDir, APP_URL: appUrl },
});

setTimeout(() => {
  console.log(`\nTwinleaf is running on ${appUrl}\n\nSign in with:\n${formatSignIns(users)}\n\nCaught mail: sign in as admin and open Administration → Mail. Stop with Ctrl+C.\n`);
}, 1500);

const stop = async () => {
  server.kill("SIGTERM");
  await smtp.close();
};
process.on("SIGINT", () => void stop().then(() => process.exit(0)));
process.on("SIGTERM", () => void stop().then(() => process.exit(0)));
server.on("exit", async (code) => {
  await smtp.close();
  process.exit(code ?? 0);
});
