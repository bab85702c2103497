import { NextResponse, type NextRequest } from "next/server";
import { clientAddressOf, PEER_HEADER, trustedProxyHops } from "./lib/auth/client-address";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";

/** The page a client over the certificate check's limit gets, with status 429 and Retry-After. */
function tooManyChecks(retryAfterSeconds: number): Response {
  const minutes = Math.max(1, Math.ceil(retryAfterSeconds / 60));
  const body = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Please wait a little · Twinleaf</title></head>
<body style="font-family:system-ui,sans-serif;max-width:36rem;margin:3rem auto;padding:0 1rem;line-height:1.5">
<h1>Please wait a little</h1>
<p>Too many certificate checks came from your address. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.</p>
</body></html>`;
  return new Response(body, {
    status: 429,
    headers: { "content-type": "text/html; charset=utf-8", "retry-after": String(retryAfterSeconds), "cache-control": "no-store" },
  });
}

// The certificate check is public; its limit is counted here, where the answer's status can be set.
async function verifyLimit(req: NextRequest): Promise<Response> {
  const [{ getDb }, { hitVerifyLimit }] = await Promise.all([import("./db"), import("./lib/dispatch/rate-limit")]);
  const address = clientAddressOf({ peer: req.headers.get(PEER_HEADER), forwardedFor: req.headers.get("x-forwarded-for"), hops: trustedProxyHops() });
  const hit = await hitVerifyLimit(getDb(), address);
  return hit.ok ? NextResponse.next() : tooManyChecks(hit.retryAfterSeconds);
}

// For other pages only a convenience: sends the signed-out to sign-in. Every page, action and route
// still checks the session and the permission itself.
export async function proxy(req: NextRequest) {
  const path = req.nextUrl.pathname;
  if (path.startsWith("/verify/")) return verifyLimit(req);
  if (path.startsWith("/verify")) return NextResponse.next();
  if (req.cookies.has(SESSION_COOKIE)) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = path === "/" ? "" : `?next=${encodeURIComponent(path + req.nextUrl.search)}`;
  return NextResponse.redirect(url);
}

export const config = {
  // Public: sign-in and its links, the API (answers 401 itself), assets. The certificate check
  // (/verify/…) is public too, but passes here for its limit.
  matcher: ["/((?!sign-in|reset|invite|api/|_next/|fonts/|favicon.ico).*)"],
};
