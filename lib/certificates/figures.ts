/** Figures as the workshop writes them, for the certificate and the event log alike (no server code). */

/** "1", "0.5", "0.75": a level difference or limit in dB, without trailing zeros. */
export function formatDb(db: number, digits = 2): string {
  return String(Number(db.toFixed(digits)));
}

/** "200 Hz", "10 kHz", "12.5 kHz". */
export function formatHz(hz: number): string {
  return hz >= 1000 ? `${Number((hz / 1000).toPrecision(4))} kHz` : `${Number(hz.toPrecision(4))} Hz`;
}
