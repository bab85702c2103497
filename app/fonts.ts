import localFont from "next/font/local";

// Atkinson Hyperlegible for text (made for legibility at a distance and for low vision) and
// IBM Plex Mono for serials, where 0/O and 1/I must never be confused. Both ship in public/fonts.
export const textFont = localFont({
  variable: "--font-text",
  display: "swap",
  src: [
    { path: "../public/fonts/atkinson-hyperlegible-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../public/fonts/atkinson-hyperlegible-latin-400-italic.woff2", weight: "400", style: "italic" },
    { path: "../public/fonts/atkinson-hyperlegible-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
});

export const serialFont = localFont({
  variable: "--font-serial",
  display: "swap",
  src: [
    { path: "../public/fonts/ibm-plex-mono-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "../public/fonts/ibm-plex-mono-latin-600-normal.woff2", weight: "600", style: "normal" },
  ],
});
