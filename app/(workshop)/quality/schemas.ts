import { z } from "zod";

const SITE = "http://twinleaf.invalid";

/**
 * A path on this site: it starts with a single "/" (not "//" or "/\", which browsers read as
 * another host), holds no control characters, and resolves to this origin (OWASP: unvalidated
 * redirects).
 */
export function isLocalPath(path: string): boolean {
  if (!path.startsWith("/") || path.startsWith("//") || /[\u0000-\u001f\u007f\\]/.test(path)) return false;
  try {
    return new URL(path, SITE).origin === SITE;
  } catch {
    return false;
  }
}

/** `path` (a local path) with `key=value` added to its query, its fragment kept. */
export function withQuery(path: string, key: string, value: string): string {
  const url = new URL(path, SITE);
  url.searchParams.set(key, value);
  return `${url.pathname}${url.search}${url.hash}`;
}

export const dispositionSchema = z.object({
  ncId: z.string().min(1),
  /** The page the form was on, to return to: only ever a page of this site. */
  back: z
    .string()
    .max(500)
    .default("")
    .refine((b) => b === "" || isLocalPath(b), "The page to return to must be a page of Twinleaf."),
  disposition: z.enum(["rework", "use_as_is", "scrap"], { error: "Choose rework, use as is, or scrap." }),
  reworkToSeq: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().min(1).nullable()),
  scrapSide: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.enum(["L", "R"]).nullable()),
  reason: z.string().trim().min(5, "Give the reason (at least a few words).").max(500),
});
