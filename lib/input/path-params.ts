/**
 * A value from an address's path (a serial, a batch code, an upload or message id, a link's
 * token). Next.js decodes each segment once before a page or route sees it; decoding it again
 * would turn "%25" into a broken escape (and "%2525" into another serial), so nothing here
 * decodes. A value is taken as it is, or refused when no serial, code or id could look like it.
 */

/** Far longer than any serial, code, id or token Twinleaf makes. */
export const PATH_PARAM_MAX = 200;

/** Control characters (C0, DEL, C1) and unpaired surrogates never belong to a name. */
const UNREADABLE = /[\u0000-\u001f\u007f-\u009f]|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

/** The value as given, or null when it is missing, a list, empty, too long or unreadable. */
export function pathParam(value: unknown): string | null {
  if (typeof value !== "string") return null;
  if (value.length === 0 || value.length > PATH_PARAM_MAX) return null;
  if (UNREADABLE.test(value)) return null;
  return value;
}

/** Every value of a route's params checked; null when any is refused (a catch-all's parts each). */
export function pathParams(params: Record<string, string | string[] | undefined>): Record<string, string | string[]> | null {
  const out: Record<string, string | string[]> = {};
  for (const [key, value] of Object.entries(params)) {
    if (Array.isArray(value)) {
      const parts = value.map(pathParam);
      if (parts.some((p) => p === null)) return null;
      out[key] = parts as string[];
    } else {
      const one = pathParam(value);
      if (one === null) return null;
      out[key] = one;
    }
  }
  return out;
}

/**
 * True when every segment of a raw (still encoded) path decodes: no lone "%", no "%zz", no
 * broken UTF-8 such as "%C0%AF" or an unpaired surrogate "%ED%A0%80". Next.js answers such a
 * path with a 500 of its own, so the proxy refuses it first.
 */
export function isDecodablePath(rawPath: string): boolean {
  for (const segment of rawPath.split("/")) {
    try {
      decodeURIComponent(segment);
    } catch {
      return false;
    }
  }
  return true;
}
