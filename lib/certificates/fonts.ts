import { MONO_FONT, registerPdfFonts, TEXT_FONT } from "@/lib/labels/fonts";

/** The certificate's faces: the app's Atkinson Hyperlegible and IBM Plex Mono (TrueType, see lib/labels/fonts.ts). */
export const CERT_TEXT_FONT = TEXT_FONT;
export const CERT_MONO_FONT = MONO_FONT;

/** Registers the PDF fonts once per process (shared with the labels). */
export function registerCertificateFonts(): void {
  registerPdfFonts();
}
