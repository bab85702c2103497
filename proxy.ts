import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";
import { securityHeadersFor } from "./lib/auth/security-headers";

// Public: sign-in and its links, the certificate check, the API (answers 401 itself), assets.
const PUBLIC = /^\/(?:sign-in|reset|invite|verify|api\/|_next\/|fonts\/|favicon\.ico)/;

// Only a convenience: sends the signed-out to sign-in. Every page, action and route still checks
// the session and the permission itself.
function signInRedirect(req: NextRequest): NextResponse | null {
  if (PUBLIC.test(req.nextUrl.pathname) || req.cookies.has(SESSION_COOKIE)) return null;
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = req.nextUrl.pathname === "/" ? "" : `?next=${encodeURIComponent(req.nextUrl.pathname + req.nextUrl.search)}`;
  return NextResponse.redirect(url);
}

/**
 * Security headers on every response (lib/auth/security-headers.ts). A page's nonce goes into the
 * request too, where Next reads it from the Content-Security-Policy header and puts it on its scripts.
 */
function withSecurityHeaders(req: NextRequest, answer: (requestHeaders: Headers) => NextResponse): NextResponse {
  const sec = securityHeadersFor(req.nextUrl, req.headers, { dev: process.env.NODE_ENV === "development" });
  const requestHeaders = new Headers(req.headers);
  for (const [k, v] of Object.entries(sec.request)) requestHeaders.set(k, v);
  const res = answer(requestHeaders);
  for (const [k, v] of Object.entries(sec.response)) res.headers.set(k, v);
  return res;
}

export function proxy(req: NextRequest) {
  return withSecurityHeaders(req, (requestHeaders) => signInRedirect(req) ?? NextResponse.next({ request: { headers: requestHeaders } }));
}

export const config = {
  // Every path, static files included, so that every response carries the security headers.
  matcher: ["/:path*"],
};
