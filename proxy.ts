import { NextResponse, type NextRequest } from "next/server";
import { clientAddressOf, PEER_HEADER, trustedProxyHops } from "./lib/auth/client-address";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";
import { localPath } from "./lib/input/local-path";
import { refuseMalformed } from "./lib/input/requests";

/** Pages anyone may open (sign-in and its links, the certificate check); the API answers 401 itself. */
const PUBLIC = /^\/(?:sign-in|reset|invite|verify|api\/)/;

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

// Refuses what Next.js would answer with a 500 (a broken %-escape, an oversized action body) and
// counts the certificate check's limit; otherwise only a convenience: sends the signed-out to
// sign-in. Every page, action and route still checks the session and the permission itself.
export async function proxy(req: NextRequest) {
  const path = req.nextUrl.pathname;
  const refused = await refuseMalformed(req, path);
  if (refused) return refused;
  if (path.startsWith("/verify/") && req.method === "GET") return verifyLimit(req);
  if (PUBLIC.test(path) || req.cookies.has(SESSION_COOKIE)) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  // The way back goes through the one gate for redirects; anything it refuses is simply dropped.
  const next = localPath(path + req.nextUrl.search);
  url.search = next && next !== "/" ? `?next=${encodeURIComponent(next)}` : "";
  return NextResponse.redirect(url);
}

export const config = {
  matcher: [
    // Every page, public ones included (their path encoding and action bodies are checked too).
    "/((?!api/|_next/|fonts/|favicon.ico).*)",
    // API addresses holding a "%", for their encoding only: other API requests skip the proxy,
    // which would otherwise buffer their bodies before a route's own limit could refuse them.
    "/api/:path(.*%.*)",
  ],
};
