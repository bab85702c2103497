/**
 * The security headers of every response, made in one place for proxy.ts (pages, route handlers,
 * the public certificate check, not-found and error pages) and next.config.mjs (the static files
 * the proxy does not see). No imports: the proxy and the config load it before anything else.
 *
 * The page policy follows Next's own guide to a Content Security Policy with a nonce
 * (node_modules/next/dist/docs/01-app/02-guides/content-security-policy.md): a fresh nonce per
 * request, sent to Next in the request's Content-Security-Policy header so that Next puts it on its
 * own scripts, and 'strict-dynamic' so that the scripts those load run too.
 */

/** Headers every response carries, whatever it is. */
export const COMMON_HEADERS: Readonly<Record<string, string>> = {
  // OWASP Secure Headers Project: never guess a type from the bytes (an upload served as text stays text).
  "X-Content-Type-Options": "nosniff",
  // Other sites see at most this site's origin, never a path such as a reset link's.
  "Referrer-Policy": "strict-origin-when-cross-origin",
  // The workshop's pages use none of these; the camera is for the veneer photos' file picker only,
  // which needs no permission, so everything is refused.
  "Permissions-Policy": "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), interest-cohort=()",
  // For older browsers that do not know frame-ancestors (CSP Level 2).
  "X-Frame-Options": "DENY",
};

/** What a file, a PDF, an upload or an API answer may load and do: nothing, and never be framed. */
export const NOTHING_POLICY = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

/** HSTS for a year (OWASP HTTP Strict Transport Security Cheat Sheet); sent only over https. */
export const HSTS = "max-age=31536000; includeSubDomains";

/** A nonce: 128 random bits in base64, new for every request. */
export function newNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return btoa(String.fromCharCode(...bytes));
}

/** The policy of a page, allowing only scripts that carry this request's nonce. */
export function pagePolicy(nonce: string, opts: { dev?: boolean; https?: boolean } = {}): string {
  return [
    "default-src 'self'",
    // React needs eval only in development, for its error stacks (Next's guide).
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    // Styles may be inline: style attributes (a bar's width in a chart) cannot carry a nonce, and
    // the framework's client inserts <style> elements without one. CSS runs no script; the
    // script policy above is what stops injected code.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self'",
    "connect-src 'self'",
    // The label sheet shows its PDF from a blob: address in a frame.
    "frame-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(opts.https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/**
 * The policy of a route handler's answer. The proxy's header wins over the handler's (Next keeps a
 * header already set), so the handlers' own stricter policies are repeated here: a mail attachment
 * is shown sandboxed, as its route asks.
 */
export function apiPolicy(pathname: string): string {
  return /^\/api\/v1\/admin\/mail\/[^/]+\/attachments\//.test(pathname) ? `${NOTHING_POLICY}; sandbox` : NOTHING_POLICY;
}

/**
 * Whether the request came over https. `next start` serves plain http only, so https is always
 * ended by a proxy in front; only one the operator trusts (TWINLEAF_TRUSTED_PROXY=1) is believed
 * when it says so in X-Forwarded-Proto. The request's URL cannot tell: Next builds its protocol
 * from that same header, which anyone can send.
 */
export function cameOverHttps(headers: Headers, trustProxy = process.env.TWINLEAF_TRUSTED_PROXY === "1"): boolean {
  if (!trustProxy) return false;
  const proto = headers.get("x-forwarded-proto")?.split(",")[0]?.trim().toLowerCase();
  return proto === "https";
}

// Files served as they are: scripts, style sheets, fonts, the icon. A page's policy does not apply
// to them, and they need no nonce.
const STATIC_FILES = /^\/(?:_next\/static\/|_next\/image|fonts\/|favicon\.ico$)/;

export interface SecurityHeaders {
  /** Headers to add to the request that Next renders (the nonce and the policy it reads it from). */
  request: Record<string, string>;
  /** Headers to set on the response. */
  response: Record<string, string>;
}

/** The headers of one request, by its path: files and API answers get the nothing policy, pages a nonce. */
export function securityHeadersFor(url: URL, headers: Headers, opts: { dev?: boolean; trustProxy?: boolean } = {}): SecurityHeaders {
  const https = cameOverHttps(headers, opts.trustProxy);
  const response: Record<string, string> = { ...COMMON_HEADERS, ...(https ? { "Strict-Transport-Security": HSTS } : {}) };
  if (STATIC_FILES.test(url.pathname)) return { request: {}, response: { ...response, "Content-Security-Policy": NOTHING_POLICY } };
  if (url.pathname === "/api" || url.pathname.startsWith("/api/")) {
    return { request: {}, response: { ...response, "Content-Security-Policy": apiPolicy(url.pathname) } };
  }
  const nonce = newNonce();
  const csp = pagePolicy(nonce, { dev: opts.dev, https });
  return { request: { "x-nonce": nonce, "Content-Security-Policy": csp }, response: { ...response, "Content-Security-Policy": csp } };
}
