import { NextResponse, type NextRequest } from "next/server";
import { SESSION_COOKIE } from "./lib/auth/lucia-cookie";

// Only a convenience: sends the signed-out to sign-in. Every page, action and route still checks
// the session and the permission itself.
export function proxy(req: NextRequest) {
  if (req.cookies.has(SESSION_COOKIE)) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = req.nextUrl.pathname === "/" ? "" : `?next=${encodeURIComponent(req.nextUrl.pathname + req.nextUrl.search)}`;
  return NextResponse.redirect(url);
}

export const config = {
  // Public: sign-in and its links, the certificate check, the API (answers 401 itself), assets.
  matcher: ["/((?!sign-in|reset|invite|verify|api/|_next/|fonts/|favicon.ico).*)"],
};
