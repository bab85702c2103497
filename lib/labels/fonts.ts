import path from "node:path";
import { Font } from "@react-pdf/renderer";

export const TEXT_FONT = "Atkinson Hyperlegible";
export const MONO_FONT = "IBM Plex Mono";

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
