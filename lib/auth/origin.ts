/**
 * Cross-site request forgery: a browser sends the session cookie with a form or fetch that another
 * site makes, but it also says where the request came from. A request that changes state goes on
 * only with an `Origin` naming this host (the host the browser sent it to, as Next compares it for
 * server actions) and, when the browser sends `Sec-Fetch-Site`, with that saying "same-origin";
 * with neither header it is refused. A machine token (`Authorization: Bearer`) is judged by the
 * token instead: no other site can make a browser send that header. Web-standard Request only, so
 * route handlers (lib/auth/guard.ts) and the proxy (server actions) share it.
 */

export const CROSS_ORIGIN_REFUSED =
  "Refused: this request did not come from one of Twinleaf's own pages, so nothing was done. Open Twinleaf and do it from there.";

/** Methods that only read; every other method changes something and must come from this origin. */
const READ_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

export function comesFromHere(req: Request): boolean {
  if (READ_METHODS.has(req.method.toUpperCase())) return true;
  if (/^Bearer(\s|$)/i.test(req.headers.get("authorization")?.trim() ?? "")) return true;
  const origin = req.headers.get("origin");
  const site = req.headers.get("sec-fetch-site");
  if (site !== null && site.trim().toLowerCase() !== "same-origin") return false;
  if (origin !== null) return ownHosts(req).has(hostOf(origin) ?? "");
  return site !== null;
}

function hostOf(origin: string): string | null {
  try {
    const u = new URL(origin);
    return u.protocol === "http:" || u.protocol === "https:" ? u.host.toLowerCase() : null;
  } catch {
    return null; // "null" (a sandboxed frame, a file) or garbage
  }
}

/** The names this app answers to: the host the request was sent to (as a proxy forwards it) and APP_URL's. */
function ownHosts(req: Request): Set<string> {
  const out = new Set<string>();
  const add = (h: string | null | undefined) => {
    const v = h?.split(",")[0]?.trim().toLowerCase();
    if (v) out.add(v);
  };
  add(req.headers.get("x-forwarded-host"));
  add(req.headers.get("host"));
  add(new URL(req.url).host);
  if (process.env.APP_URL) add(hostOf(process.env.APP_URL));
  return out;
}
