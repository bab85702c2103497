/** A finish's particulars in one line, as the certificate and the register print them. Pure. */
import { cutWords } from "@/lib/vocabulary/veneer-cuts";

/**
 * "Juglans nigra, crown cut" for a species; "satin, sRGB #3E4A52" for a colour (an sRGB hex is
 * named as such; a colour-card reference is printed as it is). The free note follows a species'
 * particulars and leads a colour's.
 */
export function finishDetail(f: { kind: string; botanicalName: string; cut: string; colourRef: string; detail: string }): string {
  if (f.kind === "veneer") return [f.botanicalName, cutWords(f.cut), f.detail].filter(Boolean).join(", ");
  const ref = /^#[0-9A-Fa-f]{6}$/.test(f.colourRef) ? `sRGB ${f.colourRef.toUpperCase()}` : f.colourRef;
  return [f.detail, ref].filter(Boolean).join(", ");
}

/** An sRGB swatch colour, or null when the reference is not a hex. */
export const swatchOf = (ref: string): string | null => (/^#[0-9A-Fa-f]{6}$/.test(ref.trim()) ? ref.trim().toUpperCase() : null);
