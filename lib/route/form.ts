/** The fields of a parsed form that start with `prefix`, keyed without it (e.g. readings sent as "reading.platenC"). */
export function formDataValues(input: Record<string, unknown>, prefix: string): Record<string, string | boolean | undefined> {
  const out: Record<string, string | boolean | undefined> = {};
  for (const [k, v] of Object.entries(input)) {
    if (!k.startsWith(prefix)) continue;
    const key = k.slice(prefix.length);
    // Kept as text: a check's "pass"/"fail" is read by checkReadings, and a text reading (a lot
    // written "PASS-…") must not turn into a check's answer here.
    if (typeof v === "string") out[key] = v;
  }
  return out;
}
