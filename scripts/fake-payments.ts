// The payment provider's local stand-in on its own: `npx tsx scripts/fake-payments.ts`.
// It listens on PAYMENTS_PORT (default: a free port) on loopback, keeps its state in
// PAYMENTS_STATE_FILE (default data/fake-payments.json), accepts the key STRIPE_SECRET_KEY and
// signs webhooks with STRIPE_WEBHOOK_SECRET (each made up and printed when unset), and POSTs them
// to APP_URL's /api/v1/payments/webhook. It prints the settings to start the app with.
import { randomBytes } from "node:crypto";
import { resolve } from "node:path";
import { startPaymentStandIn } from "../lib/payments/stand-in";

const appUrl = (process.env.APP_URL || "http://localhost:3000").replace(/\/$/, "");
const secretKey = process.env.STRIPE_SECRET_KEY?.trim() || `sk_test_standin_${randomBytes(12).toString("hex")}`;
const webhookSecret = process.env.STRIPE_WEBHOOK_SECRET?.trim() || `whsec_standin_${randomBytes(16).toString("hex")}`;
const stateFile = resolve(process.env.PAYMENTS_STATE_FILE || "data/fake-payments.json");

const standIn = await startPaymentStandIn({
  port: Number(process.env.PAYMENTS_PORT) || 0,
  stateFile,
  secretKey,
  webhookSecret,
  webhookUrl: `${appUrl}/api/v1/payments/webhook`,
});
console.log(`Payment stand-in listening on ${standIn.url}, keeping its state in ${stateFile}.`);
console.log(`Start the app with:\n  STRIPE_API_BASE=${standIn.url} STRIPE_SECRET_KEY=${secretKey} STRIPE_WEBHOOK_SECRET=${webhookSecret}`);

const shutdown = () => void standIn.close().then(() => process.exit(0));
process.once("SIGINT", shutdown);
process.once("SIGTERM", shutdown);
