/**
 * The Serial Shipping Container Code, AI (00): GS1 General Specifications §2.2.1
 * (docs/REFERENCES.md, § GS1). 18 digits: the extension digit, the GS1 company prefix (7–10 digits), the serial
 * reference (filling the rest up to 17 digits) and the mod-10 check digit.
 */
import { gs1CheckDigit } from "@/lib/serials/gs1";

export interface SsccParts {
  /** 0–9, chosen by the company to widen its range. */
  extension: number;
  /** The GS1 company prefix, 7 to 10 digits. */
  companyPrefix: string;
  /** A number the company allocates once: 0 … maxSerialReference(prefix). */
  serialReference: number;
}

/** The largest serial reference a prefix leaves room for: 16 − prefix length digits. */
export function maxSerialReference(companyPrefix: string): number {
  return 10 ** (16 - companyPrefix.length) - 1;
}

/** The 18-digit SSCC of its parts, check digit included. Throws on parts that do not fit. */
export function formatSscc({ extension, companyPrefix, serialReference }: SsccParts): string {
  if (!Number.isInteger(extension) || extension < 0 || extension > 9) throw new Error(`SSCC: the extension digit is 0 to 9, got ${extension}`);
  if (!/^[0-9]{7,10}$/.test(companyPrefix)) throw new Error(`SSCC: a GS1 company prefix is 7 to 10 digits, got "${companyPrefix}"`);
  const max = maxSerialReference(companyPrefix);
  if (!Number.isInteger(serialReference) || serialReference < 0 || serialReference > max) {
    throw new Error(`SSCC: with a ${companyPrefix.length}-digit prefix the serial reference is 0 to ${max}, got ${serialReference}`);
  }
  const data = `${extension}${companyPrefix}${String(serialReference).padStart(16 - companyPrefix.length, "0")}`;
  return `${data}${gs1CheckDigit(data)}`;
}

/** Eighteen digits whose last is the mod-10 check digit of the other seventeen. */
export function isValidSscc(sscc: string): boolean {
  return /^[0-9]{18}$/.test(sscc) && gs1CheckDigit(sscc.slice(0, 17)) === Number(sscc[17]);
}

/** The SSCC's parts, given the length of the company prefix it was made with. */
export function splitSscc(sscc: string, prefixLength: number): { extension: string; companyPrefix: string; serialReference: string; check: string } {
  return {
    extension: sscc.slice(0, 1),
    companyPrefix: sscc.slice(1, 1 + prefixLength),
    serialReference: sscc.slice(1 + prefixLength, 17),
    check: sscc.slice(17),
  };
}

/**
 * The human-readable line under the bars, spaced at the parts as GS1's logistic label example
 * writes it: "(00) 0 9521234 000000001 8". Without a known prefix length, "(00) " and the digits.
 */
export function ssccHri(sscc: string, prefixLength?: number): string {
  if (!prefixLength) return `(00) ${sscc}`;
  const p = splitSscc(sscc, prefixLength);
  return `(00) ${p.extension} ${p.companyPrefix} ${p.serialReference} ${p.check}`;
}

/** The bracketed element string bwip-js's gs1-128 encoder reads. */
export function ssccElement(sscc: string): string {
  if (!isValidSscc(sscc)) throw new Error(`SSCC: "${sscc}" is not 18 digits with a right check digit`);
  return `(00)${sscc}`;
}
