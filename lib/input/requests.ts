/**
 * What the proxy refuses before Next.js routes a request, where Next itself would answer 500:
 * a path whose percent-encoding is broken, and a server action's body over the limit the
 * framework enforces (next.config.mjs, `experimental.serverActions.bodySizeLimit`). Web-standard
 * Request and Response only, so it runs in the proxy and in tests alike.
 */
import { ACTION_BODY_LIMIT, declaredLength, tooLargeMessage } from "./body";
import { isDecodablePath } from "./path-params";

export const BAD_ADDRESS = "This address is not valid: part of it is not properly percent-encoded.";

const METHODS_WITHOUT_BODY = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * A plain answer. For a server action, Next's client shows a text/plain error's words (and
 * only when the type is exactly that), so pages get text/plain and the API gets JSON.
 */
function refuse(status: number, message: string, api: boolean): Response {
  if (api) return Response.json({ error: message }, { status });
  return new Response(message, { status, headers: { "content-type": "text/plain", "cache-control": "no-store" } });
}

/** Counts a body that declared no length, stopping as soon as it passes `limit`. */
async function bodyExceeds(req: Request, limit: number): Promise<boolean> {
  if (!req.body) return false;
  const reader = req.body.getReader();
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) return false;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => undefined);
      return true;
    }
  }
}

/**
 * The refusal for `req`, or null to let it through. `rawPath` is the path as it arrived, still
 * percent-encoded. Route handlers under /api/ set their own body limits (lib/auth/guard.ts).
 */
export async function refuseMalformed(req: Request, rawPath: string): Promise<Response | null> {
  const api = rawPath.startsWith("/api/");
  if (!isDecodablePath(rawPath)) return refuse(400, BAD_ADDRESS, api);
  if (api || METHODS_WITHOUT_BODY.has(req.method)) return null;
  const declared = declaredLength(req.headers);
  if (declared !== null) return declared > ACTION_BODY_LIMIT ? refuse(413, tooLargeMessage(ACTION_BODY_LIMIT, declared), false) : null;
  return (await bodyExceeds(req, ACTION_BODY_LIMIT)) ? refuse(413, tooLargeMessage(ACTION_BODY_LIMIT, null), false) : null;
}
