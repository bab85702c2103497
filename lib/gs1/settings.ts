/**
 * The workshop's GS1 settings, read from the environment:
 * - TWINLEAF_GS1_COMPANY_PREFIX: the company prefix GS1 licensed to the workshop, 7–10 digits.
 *   Unset, Twinleaf uses DEMO_COMPANY_PREFIX, in the range GS1 keeps for demonstrations, so a demo
 *   carton can never carry a real company's number.
 * - TWINLEAF_SSCC_EXTENSION: the SSCC's extension digit, 0–9 (default 0).
 * - TWINLEAF_GLN: the workshop's Global Location Number (13 digits), optional; the EPCIS export
 *   names the workshop by it when set.
 */
import { gs1CheckDigit } from "@/lib/serials/gs1";

export const COMPANY_PREFIX_SETTING = "TWINLEAF_GS1_COMPANY_PREFIX";
export const EXTENSION_SETTING = "TWINLEAF_SSCC_EXTENSION";
export const GLN_SETTING = "TWINLEAF_GLN";

/**
 * GS1 Prefix 952 is kept by GS1 for demonstrations and examples (from memory of GS1's list of
 * prefixes): the demo workshop's invented 7-digit company prefix lies inside it, and its models'
 * GTINs (db/seed/data.ts, e.g. 1 9527730 00100 1) are made with it.
 */
export const DEMO_COMPANY_PREFIX = "9527730";

export interface Gs1Settings {
  companyPrefix: string;
  extension: number;
  /** True when no prefix is set and the demonstration prefix stands in. */
  demo: boolean;
  gln: string | null;
}

type Env = Record<string, string | undefined>;

/** The settings, or the list of what is wrong with them in words for whoever runs the workshop. */
export function checkGs1Settings(env: Env = process.env): { ok: true; settings: Gs1Settings } | { ok: false; problems: string[] } {
  const problems: string[] = [];
  const rawPrefix = env[COMPANY_PREFIX_SETTING]?.trim() ?? "";
  const rawExt = env[EXTENSION_SETTING]?.trim() ?? "";
  const rawGln = env[GLN_SETTING]?.trim() ?? "";
  if (rawPrefix && !/^[0-9]{7,10}$/.test(rawPrefix)) {
    problems.push(`${COMPANY_PREFIX_SETTING} is "${rawPrefix}": a GS1 company prefix is 7 to 10 digits, as GS1 issued it.`);
  }
  if (rawExt && !/^[0-9]$/.test(rawExt)) problems.push(`${EXTENSION_SETTING} is "${rawExt}": the SSCC extension digit is one digit, 0 to 9.`);
  if (rawGln && !(/^[0-9]{13}$/.test(rawGln) && gs1CheckDigit(rawGln.slice(0, 12)) === Number(rawGln[12]))) {
    problems.push(`${GLN_SETTING} is "${rawGln}": a GLN is 13 digits ending in its GS1 check digit.`);
  }
  if (problems.length) return { ok: false, problems };
  return {
    ok: true,
    settings: { companyPrefix: rawPrefix || DEMO_COMPANY_PREFIX, extension: rawExt ? Number(rawExt) : 0, demo: !rawPrefix, gln: rawGln || null },
  };
}

/** The settings; throws an Error naming every wrong one. */
export function gs1Settings(env: Env = process.env): Gs1Settings {
  const r = checkGs1Settings(env);
  if (!r.ok) throw new Error(r.problems.join(" "));
  return r.settings;
}
