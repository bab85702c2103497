import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";
import { localPath } from "./lib/input/local-path";
import { refuseMalformed } from "./lib/input/requests";

/** Pages anyone may open (sign-in and its links, the certificate check); the API answers 401 itself. */
const PUBLIC = /^\/(?:sign-in|reset|invite|verify|api\/)/;

// Refuses what Next.js would answer with a 500 (a broken %-escape, an oversized action body);
// otherwise only a convenience: sends the signed-out to sign-in. Every page, action and route
// still checks the session and the permission itself.
export async function proxy(req: NextRequest) {
  const refused = await refuseMalformed(req, req.nextUrl.pathname);
  if (refused) return refused;
  if (PUBLIC.test(req.nextUrl.pathname) || req.cookies.has(SESSION_COOKIE)) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  // The way back goes through the one gate for redirects; anything it refuses is simply dropped.
  const next = localPath(req.nextUrl.pathname + req.nextUrl.search);
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
