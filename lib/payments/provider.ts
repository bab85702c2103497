// The payment provider through its own SDK (the `stripe` package). The same code reaches the real
// service or the local stand-in (lib/payments/stand-in.ts): only the settings differ.
import Stripe from "stripe";
import { AppError } from "@/lib/auth/errors";

export interface ProviderConfig {
  secretKey: string;
  /** Where the API is: the SDK's own `host`, `port` and `protocol`; undefined for the real service. */
  api?: { host: string; port: number; protocol: "http" | "https" };
  webhookSecret: string | null;
}

export const NOT_SET_UP = "Payments are not set up on this server (STRIPE_SECRET_KEY is missing). Nothing was sent; tell an administrator.";

/** STRIPE_API_BASE ("http://127.0.0.1:12111") as the SDK's constructor takes it. */
export function apiBase(base: string | undefined): ProviderConfig["api"] {
  if (!base?.trim()) return undefined;
  let url: URL;
  try {
    url = new URL(base.trim());
  } catch {
    throw new Error(`STRIPE_API_BASE is "${base}", which is not a URL such as http://127.0.0.1:12111.`);
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") throw new Error("STRIPE_API_BASE must be an http:// or https:// URL.");
  const protocol = url.protocol === "http:" ? "http" : "https";
  return { host: url.hostname, port: url.port ? Number(url.port) : protocol === "http" ? 80 : 443, protocol };
}

export function readProviderConfig(env: Record<string, string | undefined> = process.env): ProviderConfig | null {
  const secretKey = env.STRIPE_SECRET_KEY?.trim();
  if (!secretKey) return null;
  return { secretKey, api: apiBase(env.STRIPE_API_BASE), webhookSecret: env.STRIPE_WEBHOOK_SECRET?.trim() || null };
}

/** An SDK client for these settings. */
export function providerClient(config: ProviderConfig): Stripe {
  return new Stripe(config.secretKey, {
    ...(config.api ?? {}),
    // One try per call: a retried checkout could open a second session; refunds carry their own idempotency key.
    maxNetworkRetries: 0,
    timeout: 20_000,
    appInfo: { name: "Twinleaf" },
  });
}

/** The SDK client of this server's settings, or a 503 the desk can read. */
export function provider(env: Record<string, string | undefined> = process.env): Stripe {
  const config = readProviderConfig(env);
  if (!config) throw new AppError(503, NOT_SET_UP);
  return providerClient(config);
}

/** A provider failure in the desk's words; the provider's own message is kept for the log only. */
export function providerFailure(e: unknown, doing: string): AppError {
  const message = e instanceof Error ? e.message : String(e);
  console.error(`payment provider: ${doing}: ${message}`);
  return new AppError(502, `The payment service did not answer as expected while ${doing}. Nothing was recorded; try again in a minute.`);
}

export { Stripe };
