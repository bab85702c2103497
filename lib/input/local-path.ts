/**
 * The one gate for every untrusted "where to go next": the page after sign-in, the page a form
 * returns to, the `next` the proxy hands to sign-in, and every redirect an action asks for. It
 * answers a path on Twinleaf's own origin, or null: never a path a browser could read as another
 * host (OWASP's guidance on unvalidated redirects; WHATWG URL parsing, which drops tabs and
 * newlines, reads "\" like "/" and resolves "%2e%2e" like "..").
 *
 * Pure and free of Next.js, so the proxy, the guard, schemas and tests share it.
 */

/** Longer than any address Twinleaf makes; a longer one is refused rather than cut. */
export const LOCAL_PATH_MAX = 2048;

const SITE = "http://twinleaf.invalid";

/**
 * Printable ASCII only: Twinleaf's own addresses are percent-encoded, so a raw space, control
 * character, backslash or non-ASCII letter is never part of one, and each can change how a
 * browser splits the address.
 */
const PLAIN = /^[\x21-\x5b\x5d-\x7e]*$/;

/** Percent-decoded once, or null when the encoding is broken (a lone "%", "%zz", bad UTF-8). */
function decodedOnce(text: string): string | null {
  try {
    return decodeURIComponent(text);
  } catch {
    return null;
  }
}

/**
 * One "/" then a path: not "//" or "/\" (another host), nothing outside printable ASCII, and
 * the same once decoded, so a proxy or server that decodes before it looks cannot be led away.
 */
function looksLocal(path: string): boolean {
  if (path[0] !== "/" || !PLAIN.test(path)) return false;
  const decoded = decodedOnce(path);
  if (decoded === null) return false;
  for (const p of [path, decoded]) {
    if (p[1] === "/" || p[1] === "\\") return false;
  }
  return !/[\u0000-\u0020\u007f-\u009f\\]/.test(decoded);
}

/**
 * `input` as a same-origin path ("/lab/batches/TW-2611-01?registered=1"), normalised the way a
 * browser would read it, or null. What comes out is checked as strictly as what came in, so a
 * dot segment that resolves to "//host" is refused, and reading the answer again changes nothing.
 */
export function localPath(input: unknown): string | null {
  if (typeof input !== "string" || input.length === 0 || input.length > LOCAL_PATH_MAX) return null;
  if (!looksLocal(input)) return null;
  let url: URL;
  try {
    url = new URL(input, SITE);
  } catch {
    return null;
  }
  if (url.origin !== SITE) return null;
  const out = `${url.pathname}${url.search}${url.hash}`;
  if (out.length > LOCAL_PATH_MAX || !looksLocal(out)) return null;
  // A fixed point: the browser reading the answer lands exactly where it says.
  if (new URL(out, SITE).href !== url.href) return null;
  return out;
}

/** True when `input` may be used as a same-origin path. */
export const isLocalPath = (input: unknown): boolean => localPath(input) !== null;

/**
 * A local path with `key=value` set in its query, its fragment kept; null when `path` is not a
 * local path (so a caller cannot build a redirect around the gate).
 */
export function withQuery(path: string, key: string, value: string): string | null {
  const safe = localPath(path);
  if (safe === null) return null;
  const url = new URL(safe, SITE);
  url.searchParams.set(key, value);
  return localPath(`${url.pathname}${url.search}${url.hash}`);
}
