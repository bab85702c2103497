/**
 * Countries as ISO 3166-1 alpha-2 codes, checked against the i18n-iso-countries package (its list
 * follows the ISO 3166 Maintenance Agency's). Pure: the dealer and owner forms and tests share it.
 */
import countries from "i18n-iso-countries";
import en from "i18n-iso-countries/langs/en.json";

countries.registerLocale(en);

/**
 * Codes people often type that ISO 3166-1 does not assign to the country they mean (UK and EL are
 * "exceptionally reserved" in ISO 3166-1, used by the EU and others, not the alpha-2 codes).
 */
const MISTAKES: Record<string, string> = { UK: "GB", EL: "GR" };

/** Why a country code is not an ISO 3166-1 alpha-2 code, or null when it is. */
export function countryProblem(raw: string): string | null {
  const code = raw.trim().toUpperCase();
  if (!/^[A-Z]{2}$/.test(code)) return "Give the country as its two-letter ISO 3166-1 code, e.g. GB, FR, DE.";
  const meant = MISTAKES[code];
  if (meant) return `${code} is not an ISO 3166-1 code: ${countries.getName(meant, "en")} is ${meant}.`;
  if (!countries.isValid(code)) return `${code} is not an ISO 3166-1 country code. Check the code, e.g. GB, FR, DE.`;
  return null;
}

/** "France" for "FR"; the code itself when unknown. */
export function countryName(code: string): string {
  return countries.getName(code.toUpperCase(), "en") ?? code;
}
