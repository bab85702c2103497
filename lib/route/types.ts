/**
 * The cabinet route: a model's process spec (ordered steps, the readings each takes with their
 * windows, and the holds after them) and the history a pair has made along it. Pure types, shared
 * by the rules (lib/route/rules.ts), the server code and the pages.
 */

import type { RouteStation } from "@/lib/vocabulary/stations";

export interface ReadingSpec {
  key: string;
  label: string;
  /** "°C", "min", "mm"…; null for a check, a text or a grit. */
  unit: string | null;
  /**
   * A number within [min, max] (either may be absent), |value| ≤ absMax; an inspector's pass/fail
   * check; a text recorded as given (a lacquer lot: no window); or an abrasive's P-grade (FEPA /
   * ISO 6344), recorded as its number (240 for P240) with min/max as grades.
   */
  kind: ReadingKind;
  min?: number;
  max?: number;
  /** For a text: the most characters it may have (TEXT_READING_MAX when absent). */
  maxLength?: number;
  /** For a text: it names a supplier's lot (a lacquer lot), which the register traces into the cabinets (lib/route/lacquer-lots.ts). */
  lot?: boolean;
  /** For deviations: the window is −absMax…+absMax. */
  absMax?: number;
  /** A number that must equal this exactly (e.g. the coat number of a coat step): a mismatch is refused as a slip, not recorded. */
  equals?: number;
}

export const READING_KINDS = ["number", "check", "text", "grit"] as const;
export type ReadingKind = (typeof READING_KINDS)[number];

/** What a recorded reading holds: a number (a grit as its P number), pass/fail, or a text as typed. */
export type ReadingValue = number | boolean | string;

export interface HoldSpec {
  /** Minutes the next step must wait. */
  minutes: number;
  /** Counted from when this step started (a clamp) or from when it was recorded as done (a coat). */
  from: "start" | "end";
  /** What people call the wait: "clamp and rest", "curing". */
  label: string;
}

export interface StepSpec {
  /** 1, 2, 3… in route order. */
  seq: number;
  key: string;
  name: string;
  station: RouteStation;
  readings: ReadingSpec[];
  holdAfter?: HoldSpec;
  /** Words for the operator: what the step is and its source ("common practice"). */
  note?: string;
}

export interface RouteSpec {
  id: string;
  modelId: string;
  version: number;
  steps: StepSpec[];
}

import type { Side } from "@/lib/vocabulary/sides";

export type { Side };

/** What has happened to a pair on its route, oldest first. Every entry comes from an appended record. */
export type RouteEntry =
  | { kind: "step"; id: number; seq: number; cabinets: Side[]; startedAt: Date; recordedAt: Date; readings: Record<string, ReadingValue>; outOfWindow: boolean }
  /** Quality sent the cabinets back: `toSeq` is the step to do again, and every step after it. */
  | { kind: "rework"; id: number; cabinets: Side[]; toSeq: number; at: Date }
  /** A nonconformance opened: the pair is on hold until it is dispositioned. */
  | { kind: "nc_opened"; id: number; ncId: string; cabinets: Side[]; at: Date }
  | { kind: "nc_closed"; id: number; ncId: string; at: Date };

export interface CabinetPosition {
  side: Side;
  /** Seqs done, in order, since the last rework back past them. */
  done: number[];
  /** The next step, or null when the route is finished. */
  next: StepSpec | null;
  /** When the next step may start because of a hold after the last step (null: no hold now). */
  holdUntil: Date | null;
  holdLabel: string | null;
}

export interface PairPosition {
  cabinets: CabinetPosition[];
  /** Open nonconformances hold the whole pair. */
  openNcs: string[];
  finished: boolean;
}
