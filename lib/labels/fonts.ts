import path from "node:path";
import { Font } from "@react-pdf/renderer";

export const TEXT_FONT = "Atkinson Hyperlegible";
export const MONO_FONT = "IBM Plex Mono";

let registered = false;

/**
 * Registers the PDF fonts with react-pdf, once per process. Static WOFF files, because
 * react-pdf's fontkit cannot read a variable font; by path from the working directory, which is
 * the project root under `next start`, vitest and the scripts alike.
 */
export function registerPdfFonts(): void {
  if (registered) return;
  const file = (name: string) => path.join(process.cwd(), "public", "fonts", name);
  Font.register({
    family: TEXT_FONT,
    fonts: [
      { src: file("atkinson-hyperlegible-latin-400-normal.woff"), fontWeight: 400 },
      { src: file("atkinson-hyperlegible-latin-700-normal.woff"), fontWeight: 700 },
    ],
  });
  Font.register({
    family: MONO_FONT,
    fonts: [
      { src: file("ibm-plex-mono-latin-400-normal.woff"), fontWeight: 400 },
      { src: file("ibm-plex-mono-latin-600-normal.woff"), fontWeight: 600 },
    ],
  });
  // A serial split across two lines with a hyphen would be misread as two serials.
  Font.registerHyphenationCallback((word) => [word]);
  registered = true;
}
