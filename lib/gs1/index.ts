/**
 * GS1 keys Twinleaf prints and exports: the mod-10 check digit and GTIN check (kept once, in
 * lib/serials/gs1.ts, beside the carton's element string), the SSCC of a carton (AI 00), GS1
 * Digital Link URIs, and the workshop's GS1 settings. Pure: no database, no Next.js.
 */
export { gs1CheckDigit, isValidGtin, GS } from "@/lib/serials/gs1";
export { formatSscc, isValidSscc, splitSscc, ssccHri, ssccElement, maxSerialReference, type SsccParts } from "./sscc";
export { digitalLink, sameScannedCode, scannedGtin } from "./keys";
export {
  COMPANY_PREFIX_SETTING,
  DEMO_COMPANY_PREFIX,
  EXTENSION_SETTING,
  GLN_SETTING,
  gs1Settings,
  checkGs1Settings,
  type Gs1Settings,
} from "./settings";
