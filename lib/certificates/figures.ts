/** Figures as the workshop writes them, for the certificate and the event log alike (no server code). */
export { bandLabel, formatHz } from "@/lib/acoustics/format";

/** "1", "0.5", "0.75": a level difference or limit in dB as a bare number, without trailing zeros; the caller writes the unit. */
export function formatDb(db: number, digits = 2): string {
  return String(Number(db.toFixed(digits)));
}
