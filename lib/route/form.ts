/** The fields of a parsed form that start with `prefix`, keyed without it (e.g. readings sent as "reading.platenC"). */
export function formDataValues(input: Record<string, unknown>, prefix: string): Record<string, string | boolean | undefined> {
  const out: Record<string, string | boolean | undefined> = {};
  for (const [k, v] of Object.entries(input)) {
    if (!k.startsWith(prefix)) continue;
    const key = k.slice(prefix.length);
    // A check is answered "pass" or "fail" (a select, so it is never left out by accident).
    if (typeof v === "string") out[key] = v === "pass" ? true : v === "fail" ? false : v;
  }
  return out;
}
