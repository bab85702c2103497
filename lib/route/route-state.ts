/**
 * The engine's pure core: from a routed group's records and nonconformances (as stored, whatever
 * the group's kind) and its members by side, the history and where each member is on the route.
 * lib/route/pair-route.ts reads the rows; this turns them into the route's state, the same way for
 * a pair, a lone lacquer cabinet and a trim part.
 */
import { position } from "./rules";
import type { PairPosition, ReadingValue, RouteEntry, Side, StepSpec } from "./types";

/** A route record as stored (route_records): the members it was done on, by id and side. */
export interface RecordRow {
  id: number;
  seq: number;
  cabinets: { id: string; side: Side }[];
  startedAt: Date;
  recordedAt: Date;
  readings: Record<string, ReadingValue>;
  outOfWindow: boolean;
}

/** A nonconformance as stored: opened, and perhaps dispositioned. */
export interface NcRow {
  code: string;
  cabinets: { id: string; side: Side }[];
  openedAt: Date;
  openedEventId: number;
  disposition: string | null;
  dispositionedAt: Date | null;
  dispositionEventId: number | null;
  reworkToSeq: number | null;
}

/** History entries for the members now at each side, from the records and nonconformances. */
export function historyFor(records: RecordRow[], ncs: NcRow[], members: { side: Side; item: { id: string } }[]): RouteEntry[] {
  const sideOf = new Map(members.map((c) => [c.item.id, c.side]));
  const sides = (list: { id: string }[]) => list.map((c) => sideOf.get(c.id)).filter((s): s is Side => Boolean(s));
  const entries: (RouteEntry & { order: number })[] = [];
  for (const r of records) {
    const s = sides(r.cabinets);
    if (s.length) entries.push({ kind: "step", id: r.id, seq: r.seq, cabinets: s, startedAt: r.startedAt, recordedAt: r.recordedAt, readings: r.readings, outOfWindow: r.outOfWindow, order: r.recordedAt.getTime() });
  }
  for (const n of ncs) {
    entries.push({ kind: "nc_opened", id: n.openedEventId, ncId: n.code, cabinets: sides(n.cabinets), at: n.openedAt, order: n.openedAt.getTime() + 0.5 });
    if (n.dispositionedAt) {
      if (n.disposition === "rework") entries.push({ kind: "rework", id: n.dispositionEventId!, cabinets: sides(n.cabinets), toSeq: n.reworkToSeq!, at: n.dispositionedAt, order: n.dispositionedAt.getTime() });
      entries.push({ kind: "nc_closed", id: n.dispositionEventId!, ncId: n.code, at: n.dispositionedAt, order: n.dispositionedAt.getTime() + 0.5 });
    }
  }
  return entries.sort((a, b) => a.order - b.order || a.id - b.id).map(({ order: _o, ...e }) => e as RouteEntry);
}

/** The history and the position of a routed group at `at`. */
export function routeState(steps: StepSpec[], records: RecordRow[], ncs: NcRow[], members: { side: Side; item: { id: string } }[], at: Date): { history: RouteEntry[]; position: PairPosition } {
  const history = historyFor(records, ncs, members);
  return { history, position: position(steps, history, members.map((m) => m.side), at) };
}
