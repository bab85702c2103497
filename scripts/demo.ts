// `npm run demo`: everything on a fresh clone. Creates data/, migrates, seeds the invented
// workshop (idempotent), starts the stand-in SMTP server, builds and starts Twinleaf.
//
// A second demo beside a running one (`PORT=3300 npm run demo`) works too: its stand-in SMTP
// server takes a free port when the usual one is taken and tells its app which; it reuses the
// running demo's build instead of rebuilding it under that demo's feet; and when both use the same
// database, only the first sends the queued mail (one sender per database).
import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import { resolve } from "node:path";
import { databaseUrl, openDb } from "../db/index";
import { migrateDatabase } from "../db/migrate";
import { formatSignIns } from "../db/seed/print";
import { SeedRefusedError, seedDemo } from "../db/seed/seed";
import { readMailConfig } from "../lib/mail/config";
import { SmtpPortTakenError, startFakeSmtp } from "../lib/mail/fake-smtp";
import { startPaymentStandIn, type PaymentStandIn } from "../lib/payments/stand-in";

const port = Number(process.env.PORT) || 3000;
const url = databaseUrl();
mkdirSync(resolve("data"), { recursive: true });

/** Which demo of this folder is running, so a second one neither rebuilds under it nor sends its mail twice. */
interface RunningDemo {
  pid: number;
  port: number;
  databaseUrl: string;
}
const RUNNING = resolve("data", "demo-running.json");

function runningDemo(): RunningDemo | null {
  let found: RunningDemo;
  try {
    found = JSON.parse(readFileSync(RUNNING, "utf8")) as RunningDemo;
  } catch {
    return null;
  }
  try {
    process.kill(found.pid, 0); // signal 0 only asks whether the process is there
    return found;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM" ? found : null;
  }
}

/** Whether `next start -p port` could listen: tried the same way, on every interface. */
function portIsFree(p: number): Promise<boolean> {
  return new Promise((ok) => {
    const probe = createServer();
    probe.once("error", () => ok(false));
    probe.listen(p, () => probe.close(() => ok(true)));
  });
}

// Said before anything slow happens, rather than after a build, with a port that is free now.
if (!(await portIsFree(port))) {
  let free: number | undefined;
  for (let p = port + 100; p <= port + 1000 && free === undefined; p += 100) if (await portIsFree(p)) free = p;
  console.error(`Port ${port} is already in use (another Twinleaf demo, or another program).`);
  console.error(free ? `Start this demo on another port, for example: PORT=${free} npm run demo` : "Start this demo on another port: PORT=<port> npm run demo");
  process.exit(1);
}
const other = runningDemo();

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
// A port someone chose is kept or refused; the usual one gives way to a free one.
const smtpPortChosen = Boolean(process.env.SMTP_PORT?.trim());
let smtp;
try {
  smtp = await startFakeSmtp({ port: mail.smtp.port, host: mail.smtp.host, dir: mail.mailboxDir, orFreePort: !smtpPortChosen });
} catch (e) {
  if (!(e instanceof SmtpPortTakenError)) throw e;
  console.error(`${e.message}\nSMTP_PORT=${e.port} is set: choose another port, or leave SMTP_PORT unset and the demo takes a free one.`);
  process.exit(1);
}
console.log(
  `stand-in SMTP server on ${mail.smtp.host}:${smtp.port}${smtp.movedFrom === undefined ? "" : ` (${smtp.movedFrom} was taken)`}, keeping mail in ${mail.mailboxDir}`,
);

const appUrl = process.env.APP_URL || `http://localhost:${port}`;

// The payment provider's stand-in, beside the SMTP one, unless a real provider is configured
// (STRIPE_SECRET_KEY set): then the app reaches it with no change.
let payments: PaymentStandIn | null = null;
let paymentEnv: Record<string, string> = {};
if (!process.env.STRIPE_SECRET_KEY?.trim()) {
  const secretKey = `sk_test_standin_${randomBytes(12).toString("hex")}`;
  const webhookSecret = `whsec_standin_${randomBytes(16).toString("hex")}`;
  payments = await startPaymentStandIn({ port: 0, stateFile: resolve("data", "fake-payments.json"), secretKey, webhookSecret, webhookUrl: `${appUrl.replace(/\/$/, "")}/api/v1/payments/webhook` });
  paymentEnv = { STRIPE_SECRET_KEY: secretKey, STRIPE_WEBHOOK_SECRET: webhookSecret, STRIPE_API_BASE: payments.url };
  console.log(`stand-in payment service on ${payments.url} (its pay pages are where the owners' payment links lead)`);
} else {
  console.log("STRIPE_SECRET_KEY is set: payments go to the provider it names, not to the stand-in.");
}

const next = resolve("node_modules/.bin/next");
if (other) {
  console.log(`Another demo from this folder is running on port ${other.port}: using its build rather than rebuilding under it.`);
} else if (process.env.DEMO_SKIP_BUILD !== "1") {
  console.log("building Twinleaf (about half a minute)…");
  const build = spawnSync(next, ["build"], { stdio: "inherit", env: process.env });
  if (build.status !== 0) {
    await smtp.close();
    await payments?.close();
    process.exit(build.status ?? 1);
  }
}

const sharesDatabase = other !== null && other.databaseUrl === url;
if (sharesDatabase) console.log(`The demo on port ${other.port} sends the queued mail of the database both use.`);

const server = spawn(next, ["start", "-p", String(port)], {
  stdio: "inherit",
  env: {
    ...process.env,
    DATABASE_URL: url,
    SMTP_HOST: mail.smtp.host,
    SMTP_PORT: String(smtp.port),
    MAILBOX_DIR: mail.mailboxDir,
    APP_URL: appUrl,
    ...paymentEnv,
    ...(sharesDatabase ? { MAIL_SENDER: "off" } : {}),
  },
});
const ours = !other && server.pid !== undefined;
if (ours) writeFileSync(RUNNING, JSON.stringify({ pid: process.pid, port, databaseUrl: url } satisfies RunningDemo));

setTimeout(() => {
  console.log(`\nTwinleaf is running on ${appUrl}\n\nSign in with:\n${formatSignIns(users)}\n\nCaught mail: sign in as admin and open Administration → Mail. Stop with Ctrl+C.\n`);
}, 1500);

let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  if (ours) rmSync(RUNNING, { force: true });
  server.kill("SIGTERM");
  await smtp.close();
  await payments?.close();
};
process.on("SIGINT", () => void stop().then(() => process.exit(0)));
process.on("SIGTERM", () => void stop().then(() => process.exit(0)));
server.on("exit", async (code) => {
  await stop();
  process.exit(code ?? 0);
});
