/**
 * The trace as built against the trace now: which parts were removed and which fitted since the
 * pair shipped. Pure, so the case page, the API and a unit test read the same answer.
 */
export interface TracePart {
  id: string;
  identity: string;
  kind: string;
  /** The identity of what holds it, and where. */
  holder: string | null;
  position: string | null;
}

export type PartChange = "same" | "removed" | "fitted";

export interface TraceComparison {
  built: (TracePart & { change: "same" | "removed" })[];
  now: (TracePart & { change: "same" | "fitted" })[];
  removed: number;
  fitted: number;
}

// A part is "the same" when the same item sits in the same holder at the same position.
const key = (p: TracePart) => `${p.holder ?? ""}\u0000${p.position ?? ""}\u0000${p.id}`;

export function compareTraces(built: TracePart[], now: TracePart[]): TraceComparison {
  const nowKeys = new Set(now.map(key));
  const builtKeys = new Set(built.map(key));
  const b = built.map((p) => ({ ...p, change: nowKeys.has(key(p)) ? ("same" as const) : ("removed" as const) }));
  const n = now.map((p) => ({ ...p, change: builtKeys.has(key(p)) ? ("same" as const) : ("fitted" as const) }));
  return { built: b, now: n, removed: b.filter((p) => p.change === "removed").length, fitted: n.filter((p) => p.change === "fitted").length };
}
