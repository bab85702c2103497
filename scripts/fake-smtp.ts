// A local SMTP server that keeps every message as an .eml file: `npx tsx scripts/fake-smtp.ts`.
// It listens on SMTP_PORT (default 2525) on loopback and writes to MAILBOX_DIR.
import { resolve } from "node:path";
import { readMailConfig } from "../lib/mail/config";
import { startFakeSmtp } from "../lib/mail/fake-smtp";

const config = readMailConfig();
const host = "127.0.0.1";
const server = await startFakeSmtp({ port: config.smtp.port, host, dir: config.mailboxDir });
console.log(`Fake SMTP listening on ${host}:${server.port}, writing messages to ${resolve(config.mailboxDir)}`);

const shutdown = () => {
  void server.close().then(() => process.exit(0));
};
process.once("SIGINT", shutdown);
process.once("SIGTERM", shutdown);
