// A local SMTP server that keeps every message as an .eml file: `npx tsx scripts/fake-smtp.ts`.
// It listens on SMTP_PORT (default 2525) on loopback and writes to MAILBOX_DIR. When SMTP_PORT is
// not set and 2525 is taken (another demo's stand-in, say), it takes a free port and says which,
// since the app must then be started with that SMTP_PORT.
import { resolve } from "node:path";
import { readMailConfig } from "../lib/mail/config";
import { SmtpPortTakenError, startFakeSmtp } from "../lib/mail/fake-smtp";

const config = readMailConfig();
const host = "127.0.0.1";
const chosen = Boolean(process.env.SMTP_PORT?.trim());
let server;
try {
  server = await startFakeSmtp({ port: config.smtp.port, host, dir: config.mailboxDir, orFreePort: !chosen });
} catch (e) {
  if (!(e instanceof SmtpPortTakenError)) throw e;
  console.error(`${e.message}\nSMTP_PORT=${e.port} is set: choose another port, or leave SMTP_PORT unset and a free one is taken.`);
  process.exit(1);
}
console.log(`Fake SMTP listening on ${host}:${server.port}, writing messages to ${resolve(config.mailboxDir)}`);
if (server.movedFrom !== undefined) {
  console.log(`Port ${server.movedFrom} was taken. Start the app with SMTP_PORT=${server.port} so its mail arrives here.`);
}

const shutdown = () => {
  void server.close().then(() => process.exit(0));
};
process.once("SIGINT", shutdown);
process.once("SIGTERM", shutdown);
