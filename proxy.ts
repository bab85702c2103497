import { NextResponse, type NextRequest } from "next/server";
import { clientAddressOf, PEER_HEADER, trustedProxyHops } from "./lib/auth/client-address";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";
import { localPath } from "./lib/input/local-path";
import { refuseMalformed } from "./lib/input/requests";
import { comesFromHere, CROSS_ORIGIN_REFUSED } from "./lib/auth/origin";
import { securityHeadersFor } from "./lib/auth/security-headers";

/** Paths anyone may open: sign-in and its links, the certificate check, the API (answers 401 itself), assets. */
const PUBLIC = /^\/(?:sign-in|reset|invite|verify|api\/|_next\/|fonts\/|favicon\.ico)/;

/** The page a client over the certificate check's limit gets, with status 429 and Retry-After. */
function tooManyChecks(retryAfterSeconds: number): NextResponse {
  const minutes = Math.max(1, Math.ceil(retryAfterSeconds / 60));
  const body = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Please wait a little · Twinleaf</title></head>
<body style="font-family:system-ui,sans-serif;max-width:36rem;margin:3rem auto;padding:0 1rem;line-height:1.5">
<h1>Please wait a little</h1>
<p>Too many certificate checks came from your address. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.</p>
</body></html>`;
  return new NextResponse(body, {
    status: 429,
    headers: { "content-type": "text/html; charset=utf-8", "retry-after": String(retryAfterSeconds), "cache-control": "no-store" },
  });
}

// The certificate check is public; its limit is counted here, where the answer's status can be set.
// Only a certificate code's page counts (/verify/<code>): the owners' link pages below it
// (/verify/registration/…, /verify/consent/…) carry 256-bit one-time tokens, nothing to guess at speed.
const CERTIFICATE_CHECK = /^\/verify\/[^/]+\/?$/;
async function verifyRefusal(req: NextRequest): Promise<NextResponse | null> {
  if (!CERTIFICATE_CHECK.test(req.nextUrl.pathname) || req.method !== "GET") return null;
  const [{ getDb, registerBusy }, { hitVerifyLimit }] = await Promise.all([import("./db"), import("./lib/dispatch/rate-limit")]);
  const address = clientAddressOf({ peer: req.headers.get(PEER_HEADER), forwardedFor: req.headers.get("x-forwarded-for"), hops: trustedProxyHops() });
  try {
    const hit = await hitVerifyLimit(getDb(), address);
    return hit.ok ? null : tooManyChecks(hit.retryAfterSeconds);
  } catch (e) {
    // Other processes' writes held the register past the wait: say so, never a 500.
    const busy = registerBusy(e);
    if (!busy) throw e;
    return new NextResponse(busy.message, { status: 503, headers: { "content-type": "text/plain; charset=utf-8", "retry-after": "1", "cache-control": "no-store" } });
  }
}

/**
 * A server action from another origin: Next refuses it itself, but with an HTTP 500. Refused here
 * first, 403 with words (text/plain, which Next's client shows), by the same rule as route handlers.
 */
function crossOriginAction(req: NextRequest): NextResponse | null {
  if (req.method !== "POST" || !req.headers.has("next-action") || comesFromHere(req)) return null;
  return new NextResponse(CROSS_ORIGIN_REFUSED, { status: 403, headers: { "content-type": "text/plain", "cache-control": "no-store" } });
}

// Only a convenience: sends the signed-out to sign-in. Every page, action and route still checks
// the session and the permission itself.
function signInRedirect(req: NextRequest): NextResponse | null {
  const path = req.nextUrl.pathname;
  if (PUBLIC.test(path) || req.cookies.has(SESSION_COOKIE)) return null;
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  // The way back goes through the one gate for redirects; anything it refuses is simply dropped.
  const next = localPath(path + req.nextUrl.search);
  url.search = next && next !== "/" ? `?next=${encodeURIComponent(next)}` : "";
  return NextResponse.redirect(url);
}

/**
 * Security headers on every response (lib/auth/security-headers.ts). A page's nonce goes into the
 * request too, where Next reads it from the Content-Security-Policy header and puts it on its scripts.
 */
async function withSecurityHeaders(req: NextRequest, answer: (requestHeaders: Headers) => Promise<Response>): Promise<Response> {
  const sec = securityHeadersFor(req.nextUrl, req.headers, { dev: process.env.NODE_ENV === "development" });
  const requestHeaders = new Headers(req.headers);
  for (const [k, v] of Object.entries(sec.request)) requestHeaders.set(k, v);
  const res = await answer(requestHeaders);
  for (const [k, v] of Object.entries(sec.response)) res.headers.set(k, v);
  return res;
}

// Refuses what Next.js would answer with a 500 (a broken %-escape, an oversized action body, an
// action from another origin),
// counts the certificate check's limit, sends the signed-out to sign-in, and sets the security
// headers on every answer.
export function proxy(req: NextRequest) {
  return withSecurityHeaders(
    req,
    async (requestHeaders) =>
      (await refuseMalformed(req, req.nextUrl.pathname)) ??
      crossOriginAction(req) ??
      (await verifyRefusal(req)) ??
      signInRedirect(req) ??
      NextResponse.next({ request: { headers: requestHeaders } }),
  );
}

export const config = {
  matcher: [
    // Every page and static file (pages get their nonce policy, files the nothing-policy).
    "/((?!api/).*)",
    // API addresses holding a "%", for their encoding only: other API requests skip the proxy,
    // which would otherwise buffer their bodies (up to 10 MB) before a route's own limit could
    // refuse them; their security headers come from next.config.mjs.
    "/api/:path(.*%.*)",
  ],
};
