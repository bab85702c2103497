import path from "node:path";
import { Font } from "@react-pdf/renderer";

export const TEXT_FONT = "Atkinson Hyperlegible";
export const MONO_FONT = "IBM Plex Mono";

/**
 * Text set in the mono face, made safe for react-pdf: its fontkit fails on IBM Plex Mono's space
 * glyph (U+0020, and the no-break space that shares it) with "Offset is outside the bounds of the
 * DataView", so each space becomes a figure space (U+2007), which has its own glyph of the same
 * width in a monospaced face. Use it for any mono text that may hold a space, such as a tracking
 * number typed at shipping.
 */
export const monoSafe = (text: string): string => text.replace(/[ \u00a0]/g, "\u2007");

let registered = false;

/**
 * Registers the PDF fonts with react-pdf, once per process. Static TrueType files (copied from
 * @expo-google-fonts into public/fonts), because react-pdf's fontkit cannot read a variable font
 * and mishandles some glyphs of the WOFF files the pages use (a space in IBM Plex Mono); by path
 * from the working directory, which is the project root under `next start`, vitest and the scripts.
 */
export function registerPdfFonts(): void {
  if (registered) return;
  const file = (name: string) => path.join(process.cwd(), "public", "fonts", name);
  Font.register({
    family: TEXT_FONT,
    fonts: [
      { src: file("atkinson-hyperlegible-400.ttf"), fontWeight: 400 },
      { src: file("atkinson-hyperlegible-700.ttf"), fontWeight: 700 },
    ],
  });
  Font.register({
    family: MONO_FONT,
    fonts: [
      { src: file("ibm-plex-mono-400.ttf"), fontWeight: 400 },
      { src: file("ibm-plex-mono-600.ttf"), fontWeight: 600 },
    ],
  });
  // A serial split across two lines with a hyphen would be misread as two serials.
  Font.registerHyphenationCallback((word) => [word]);
  registered = true;
}
