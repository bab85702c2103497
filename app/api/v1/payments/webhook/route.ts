// The payment provider's webhook: no session, the signature on the raw body is the only key
// (lib/auth/guard.ts, signedRoute). Each event is recorded once however often it comes.
import { signedRoute } from "@/lib/auth/guard";
import { getDb } from "@/db";
import { handleProviderEvent, verifyWebhook } from "@/lib/payments/webhook";

export const POST = signedRoute(
  "the payment provider",
  { bodyLimit: 256 * 1024, verify: (raw, req) => verifyWebhook(raw, req.headers.get("stripe-signature")) },
  async ({ verified }) => {
    const result = await handleProviderEvent(getDb(), verified);
    return { received: true, ...result };
  },
);
