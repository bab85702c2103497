/**
 * The route rules: where a pair's cabinets are on their route, whether a step may be recorded now,
 * and whether a step's readings are complete and inside their windows. Pure TypeScript: no server,
 * no Node APIs and no clock — every function that needs the time takes `now` explicitly.
 *
 * Times in messages come from lib/format.ts, in the workshop's time zone with its name, like
 * "14:05 on 3 Dec (Europe/London)" (the year only when it is not the year of `now`). A hold is
 * allowed from its release rounded up to the whole minute (`allowedFromMinute`): the rules enforce
 * that minute and every page shows it, so the caution and the refusal name the same time.
 */
import { formatShopTime } from "@/lib/format";
import { allowedFromMinute } from "@/lib/workshop-time";
import type { CabinetPosition, PairPosition, ReadingSpec, ReadingValue, RouteEntry, RouteSpec, Side, StepSpec } from "./types";

/** Readings are compared with their windows with this tolerance, so "0.20" typed for 0.2 is in. */
export const READING_EPSILON = 1e-9;
/** A step's start may be up to this far ahead of `now` (clocks on the shop floor drift a little). */
export const FUTURE_TOLERANCE_MS = 60_000;

const SIDES: readonly Side[] = ["L", "R"];
const MINUTE_MS = 60_000;

export type StepCheck = { ok: true } | { ok: false; reason: string; allowedAt?: Date };

export interface StepInput {
  seq: number;
  cabinets: Side[];
  startedAt: Date;
}

export interface OutOfWindow {
  key: string;
  label: string;
  value: number | boolean;
  /** "°C", "mm"…; null for a check or a grit. */
  unit: string | null;
  window: string;
  /** How the value reads when not as a number and unit: "P400" for a grit. */
  shown?: string;
  /** Which side of the window the value fell: "outside 135–140 °C", "below the minimum of 120 min", "not passed". */
  miss: string;
}

export type ReadingsCheck =
  | { ok: true; values: Record<string, ReadingValue>; outOfWindow: OutOfWindow[] }
  | { ok: false; fieldErrors: Record<string, string[]> };

/** The hold a cabinet is in because of its last done step, whether or not it has ended by now. */
export interface CabinetHold {
  side: Side;
  /** The step whose hold it is. */
  step: StepSpec;
  /** When the hold releases, rounded up to the minute (`allowedFromMinute`): a step may start at exactly this time. */
  until: Date;
  label: string;
}

// ——— words ———

/** "left" / "right". */
export function sideName(side: Side): string {
  return side === "L" ? "left" : "right";
}

/** "the left cabinet", "the left and right cabinets". */
export function cabinetsPhrase(sides: Side[]): string {
  const names = sides.map(sideName);
  return sides.length === 1 ? `the ${names[0]} cabinet` : `the ${joinAnd(names)} cabinets`;
}

function joinAnd(words: string[]): string {
  if (words.length <= 1) return words.join("");
  return `${words.slice(0, -1).join(", ")} and ${words[words.length - 1]}`;
}

/** "Step 9 (Lacquer coat 4, stoved)". */
function stepTitle(step: StepSpec): string {
  return `Step ${step.seq} (${step.name})`;
}

/** A number for people: no trailing float noise ("0.2", not "0.20000000000000001"). */
function formatNumber(n: number): string {
  return String(Number(n.toPrecision(12)));
}

// ——— the route and where the cabinets are on it ———

/** The steps of a spec, in route order. */
export function stepsOf(spec: RouteSpec | StepSpec[]): StepSpec[] {
  const steps = Array.isArray(spec) ? spec : spec.steps;
  return [...steps].sort((a, b) => a.seq - b.seq);
}

interface CabinetState {
  done: Set<number>;
  /** The step entry that last marked each seq done. */
  entries: Map<number, Extract<RouteEntry, { kind: "step" }>>;
}

interface Replay {
  cabinets: Map<Side, CabinetState>;
  openNcs: string[];
}

function replay(history: RouteEntry[], sides: readonly Side[]): Replay {
  const cabinets = new Map<Side, CabinetState>(sides.map((s) => [s, { done: new Set<number>(), entries: new Map() }]));
  const open: string[] = [];
  for (const e of history) {
    switch (e.kind) {
      case "step":
        for (const side of e.cabinets) {
          const c = cabinets.get(side);
          if (!c) continue;
          c.done.add(e.seq);
          c.entries.set(e.seq, e);
        }
        break;
      case "rework":
        for (const side of e.cabinets) {
          const c = cabinets.get(side);
          if (!c) continue;
          for (const seq of [...c.done]) {
            if (seq >= e.toSeq) {
              c.done.delete(seq);
              c.entries.delete(seq);
            }
          }
        }
        break;
      case "nc_opened":
        if (!open.includes(e.ncId)) open.push(e.ncId);
        break;
      case "nc_closed": {
        const i = open.indexOf(e.ncId);
        if (i >= 0) open.splice(i, 1);
        break;
      }
    }
  }
  return { cabinets, openNcs: open };
}

/**
 * The hold after a cabinet's last done step (the highest seq done), whatever the time now. Null
 * when that step has no hold or nothing is done.
 */
function holdOf(side: Side, state: CabinetState, steps: StepSpec[]): CabinetHold | null {
  let lastSeq: number | null = null;
  for (const seq of state.done) if (lastSeq === null || seq > lastSeq) lastSeq = seq;
  if (lastSeq === null) return null;
  const step = steps.find((s) => s.seq === lastSeq);
  const entry = state.entries.get(lastSeq);
  if (!step?.holdAfter || !entry) return null;
  const from = step.holdAfter.from === "start" ? entry.startedAt : entry.recordedAt;
  return { side, step, until: allowedFromMinute(new Date(from.getTime() + step.holdAfter.minutes * MINUTE_MS)), label: step.holdAfter.label };
}

/**
 * The holds the cabinets are in because of their last done step, whether or not they have ended by
 * now (a step recorded after the fact is compared with when it started, not with now).
 */
export function holdsOf(spec: RouteSpec | StepSpec[], history: RouteEntry[], sides: Side[] = ["L", "R"]): CabinetHold[] {
  const steps = stepsOf(spec);
  const r = replay(history, sides);
  const holds: CabinetHold[] = [];
  for (const side of sides) {
    const h = holdOf(side, r.cabinets.get(side)!, steps);
    if (h) holds.push(h);
  }
  return holds;
}

/**
 * Where the pair is on its route: replays `history` in order. A step entry marks its seq done for
 * its cabinets; a rework removes, for its cabinets, every done seq ≥ toSeq; nonconformances opened
 * and not yet closed are listed in `openNcs`. `holdUntil` is the end of the hold after the last
 * done step when that end is after `now`.
 */
export function position(spec: RouteSpec | StepSpec[], history: RouteEntry[], sides: Side[] = ["L", "R"], now: Date): PairPosition {
  const steps = stepsOf(spec);
  const r = replay(history, sides);
  const cabinets: CabinetPosition[] = sides.map((side) => {
    const state = r.cabinets.get(side)!;
    const next = steps.find((s) => !state.done.has(s.seq)) ?? null;
    const hold = next ? holdOf(side, state, steps) : null;
    const active = hold && hold.until.getTime() > now.getTime() ? hold : null;
    return {
      side,
      done: [...state.done].sort((a, b) => a - b),
      next,
      holdUntil: active ? active.until : null,
      holdLabel: active ? active.label : null,
    };
  });
  return { cabinets, openNcs: [...r.openNcs], finished: cabinets.every((c) => c.next === null) };
}

// ——— may this step be recorded? ———

/**
 * Whether `input` may be recorded now. Refuses, in this order: no cabinet named; an unknown seq; a
 * start time missing or more than a minute after `now`; an open nonconformance on the pair; a
 * cabinet whose next step is not `seq` (steps are done strictly in order; both cabinets may be
 * named only when the step is next for both); a start before a hold on a cabinet releases (a start
 * at exactly the release time is allowed; `allowedAt` is the release time).
 */
export function checkStep(spec: RouteSpec | StepSpec[], history: RouteEntry[], input: StepInput, now: Date): StepCheck {
  const steps = stepsOf(spec);
  const cabinets = SIDES.filter((s) => input.cabinets.includes(s));
  if (input.cabinets.length === 0) {
    return { ok: false, reason: "Choose the cabinet or cabinets the step was done on: left, right or both." };
  }
  if (cabinets.length === 0 || input.cabinets.some((s) => !SIDES.includes(s))) {
    return { ok: false, reason: "A cabinet is either left or right. Choose left, right or both." };
  }

  const step = steps.find((s) => s.seq === input.seq);
  if (!step) {
    const last = steps[steps.length - 1];
    return {
      ok: false,
      reason: last
        ? `There is no step ${input.seq} on this route: its steps are 1 to ${last.seq}. Choose a step from the route.`
        : `There is no step ${input.seq}: this route has no steps.`,
    };
  }

  const started = input.startedAt;
  if (!(started instanceof Date) || Number.isNaN(started.getTime())) {
    return { ok: false, reason: "Enter when the step started." };
  }
  if (started.getTime() > now.getTime() + FUTURE_TOLERANCE_MS) {
    return {
      ok: false,
      reason: `The start time ${formatShopTime(started, now)} is in the future (it is now ${formatShopTime(now, now, { zone: true })}). Enter when the step really started.`,
    };
  }

  const r = replay(history, SIDES);
  if (r.openNcs.length > 0) {
    const ids = joinAnd(r.openNcs);
    const reason =
      r.openNcs.length === 1
        ? `The pair is on hold: nonconformance ${ids} is open. Quality must disposition it first.`
        : `The pair is on hold: nonconformances ${ids} are open. Quality must disposition them first.`;
    return { ok: false, reason };
  }

  // Strict order: the step must be next for every named cabinet.
  const nextOf = (side: Side) => steps.find((s) => !r.cabinets.get(side)!.done.has(s.seq)) ?? null;
  const wrong = cabinets.filter((side) => nextOf(side)?.seq !== step.seq);
  if (wrong.length > 0) {
    const sentences = groupBy(wrong, (side) => nextOf(side)?.seq ?? null).map(([, group]) => {
      const next = nextOf(group[0]!);
      const who = cabinetsPhrase(group);
      const its = group.length === 1 ? "its" : "their";
      if (!next) return `${stepTitle(step)} is already done for ${who}: ${group.length === 1 ? "it has" : "they have"} finished the route.`;
      const verb = next.seq > step.seq ? "is already done for" : "is not next for";
      return `${stepTitle(step)} ${verb} ${who}: ${its} next step is ${next.seq}, ${next.name}.`;
    });
    const ready = cabinets.filter((side) => !wrong.includes(side));
    if (ready.length > 0) {
      sentences.push(`Record it for ${cabinetsPhrase(ready)} alone, and for ${cabinetsPhrase(wrong)} when ${wrong.length === 1 ? "it gets" : "they get"} there.`);
    }
    return { ok: false, reason: sentences.join(" ") };
  }

  // Holds: compared with when the step started, so a step recorded after the fact is checked too.
  const held = cabinets
    .map((side) => holdOf(side, r.cabinets.get(side)!, steps))
    .filter((h): h is CabinetHold => h !== null && started.getTime() < h.until.getTime());
  if (held.length > 0) {
    const allowedAt = new Date(Math.max(...held.map((h) => h.until.getTime())));
    const groups = groupBy(held, (h) => `${h.until.getTime()}|${h.label}`);
    const when = formatShopTime(allowedAt, now, { zone: true });
    let reason: string;
    if (groups.length === 1) {
      const group = groups[0]![1];
      const h = group[0]!;
      const who = cabinetsPhrase(group.map((g) => g.side));
      reason = `Not before ${when}: ${who} ${group.length === 1 ? "is" : "are"} on hold (${h.label}) until then.`;
    } else {
      const parts = held.map((h) => `${cabinetsPhrase([h.side])} is on hold (${h.label}) until ${formatShopTime(h.until, now)}`);
      reason = `Not before ${when}: ${joinAnd(parts)}.`;
    }
    return { ok: false, reason, allowedAt };
  }

  return { ok: true };
}

function groupBy<T, K>(items: T[], key: (t: T) => K): [K, T[]][] {
  const out: [K, T[]][] = [];
  for (const item of items) {
    const k = key(item);
    const g = out.find(([gk]) => gk === k);
    if (g) g[1].push(item);
    else out.push([k, [item]]);
  }
  return out;
}

// ——— readings ———

/** The window of a reading for people: "135–140 °C", "±0.2 mm", "at least 120 min", "pass". */
export function windowText(r: ReadingSpec): string {
  if (r.kind === "check") return "pass";
  if (r.kind === "text") return "as written";
  if (r.kind === "grit") {
    if (r.min !== undefined && r.max !== undefined) return r.min === r.max ? gritText(r.min) : `${gritText(r.min)}–${gritText(r.max)}`;
    if (r.min !== undefined) return `${gritText(r.min)} or finer`;
    if (r.max !== undefined) return `${gritText(r.max)} or coarser`;
    return "any P-grade";
  }
  const unit = r.unit ? ` ${r.unit}` : "";
  const parts: string[] = [];
  if (r.equals !== undefined) parts.push(`exactly ${formatNumber(r.equals)}${unit}`);
  if (r.min !== undefined && r.max !== undefined) parts.push(`${formatNumber(r.min)}–${formatNumber(r.max)}${unit}`);
  else if (r.min !== undefined) parts.push(`at least ${formatNumber(r.min)}${unit}`);
  else if (r.max !== undefined) parts.push(`at most ${formatNumber(r.max)}${unit}`);
  if (r.absMax !== undefined) parts.push(`±${formatNumber(r.absMax)}${unit}`);
  return parts.length > 0 ? parts.join(", ") : "any value";
}

/** How a number misses its window, for the question asked before it is recorded. */
function missText(r: ReadingSpec, v: number): string {
  if (r.kind === "grit") return r.min !== undefined && v < r.min ? `coarser than ${windowText(r)}` : `finer than ${windowText(r)}`;
  const unit = r.unit ? ` ${r.unit}` : "";
  if (r.absMax !== undefined && Math.abs(v) > r.absMax + READING_EPSILON) return `outside ±${formatNumber(r.absMax)}${unit}`;
  if (r.min !== undefined && r.max !== undefined) return `outside ${formatNumber(r.min)}–${formatNumber(r.max)}${unit}`;
  if (r.min !== undefined) return `below the minimum of ${formatNumber(r.min)}${unit}`;
  if (r.max !== undefined) return `above the maximum of ${formatNumber(r.max)}${unit}`;
  return `outside ${windowText(r)}`;
}

const NUMBER_RE = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/;

/**
 * A number typed on the shop floor: "137", "137.5", "137,5", "-0,15", "−0.15" (a typographic
 * minus). No thousands separators, no exponents. Null when it is not a number.
 */
export function parseReadingNumber(raw: string): number | null {
  const s = raw.trim().replace(/^[\u2212\u2013]/, "-");
  if (!NUMBER_RE.test(s)) return null;
  const n = Number(s.replace(",", "."));
  return Number.isFinite(n) ? n : null;
}

/**
 * The P-grades of coated abrasives, coarse to fine: FEPA 43-1 / ISO 6344-2 (P12–P220, macrogrits)
 * and FEPA 43-2 / ISO 6344-3 (P240–P2500, microgrits). The list is the standards' series as
 * remembered (from memory; the FEPA P-scale is widely reprinted by abrasive makers).
 */
export const P_GRADES = [12, 16, 20, 24, 30, 36, 40, 50, 60, 80, 100, 120, 150, 180, 220, 240, 280, 320, 360, 400, 500, 600, 800, 1000, 1200, 1500, 2000, 2500] as const;

/** 240 → "P240". */
export function gritText(grade: number): string {
  return `P${formatNumber(grade)}`;
}

/** A grit as typed on the shop floor: "P240", "p 240", "240". Null when it is not a P-grade of the series. */
export function parseGrit(raw: string): number | null {
  const m = /^\s*[pP]?\s*(\d{2,4})\s*$/.exec(raw);
  if (!m) return null;
  const n = Number(m[1]);
  return (P_GRADES as readonly number[]).includes(n) ? n : null;
}

/** The most characters a text reading (a lacquer lot) takes when its spec does not say. */
export const TEXT_READING_MAX = 40;

const TRUE_WORDS = new Set(["true", "pass", "passed", "yes", "y", "on", "1", "ok"]);
const FALSE_WORDS = new Set(["false", "fail", "failed", "no", "n", "off", "0"]);

function lcFirst(s: string): string {
  return s.length > 0 && !/^[A-Z]{2}/.test(s) ? s[0]!.toLowerCase() + s.slice(1) : s;
}

/** Whether a number is inside its reading's window, with the tolerance READING_EPSILON. */
function inWindow(r: ReadingSpec, v: number): boolean {
  if (r.min !== undefined && v < r.min - READING_EPSILON) return false;
  if (r.max !== undefined && v > r.max + READING_EPSILON) return false;
  if (r.absMax !== undefined && Math.abs(v) > r.absMax + READING_EPSILON) return false;
  return true;
}

/**
 * Checks the readings typed for a step. Every reading is required. Numbers are parsed from text
 * (a decimal comma is allowed); a reading that is not a number, a missing reading and a number that
 * must equal a value (the coat number) but does not are field errors. A text (a lacquer lot) is
 * trimmed, its inner spaces made single, and kept as written up to its length: it has no window.
 * A grit is a P-grade of the FEPA / ISO 6344 series ("P240" or "240"); one off the series is a
 * slip (a field error). A number or grit outside its window, or a check the inspector failed, is
 * not an error: it is returned in `outOfWindow` (it is recorded and opens a nonconformance).
 * Window edges are in.
 */
export function checkReadings(step: StepSpec, raw: Record<string, string | boolean | undefined>): ReadingsCheck {
  const values: Record<string, ReadingValue> = {};
  const outOfWindow: OutOfWindow[] = [];
  const fieldErrors: Record<string, string[]> = {};
  const fail = (key: string, msg: string) => (fieldErrors[key] ??= []).push(msg);

  for (const r of step.readings) {
    const v = raw[r.key];
    const what = lcFirst(r.label);
    if (r.kind === "check") {
      let pass: boolean | null = null;
      if (typeof v === "boolean") pass = v;
      else if (typeof v === "string") {
        const w = v.trim().toLowerCase();
        if (TRUE_WORDS.has(w)) pass = true;
        else if (FALSE_WORDS.has(w)) pass = false;
      }
      if (pass === null) {
        fail(r.key, `Answer pass or fail for “${r.label}”.`);
        continue;
      }
      values[r.key] = pass;
      if (!pass) outOfWindow.push({ key: r.key, label: r.label, value: false, unit: null, window: windowText(r), miss: "not passed" });
      continue;
    }

    if (r.kind === "text") {
      // Recorded as given (trimmed): a lot code is looked up later exactly as it was written.
      const text = typeof v === "string" ? v.trim().replace(/\s+/g, " ") : "";
      const max = r.maxLength ?? TEXT_READING_MAX;
      if (!text) fail(r.key, `Enter the ${what}.`);
      else if (text.length > max) fail(r.key, `The ${what} is at most ${max} characters; you entered ${text.length}.`);
      else if (/[\u0000-\u001f\u007f]/.test(text)) fail(r.key, `The ${what} holds a character that cannot be printed. Type it again.`);
      else values[r.key] = text;
      continue;
    }

    const unit = r.unit ? ` in ${r.unit}` : "";
    if (v === undefined || (typeof v === "string" && v.trim() === "")) {
      fail(r.key, r.kind === "grit" ? `Enter the ${what}, like P240.` : `Enter the ${what}${unit}.`);
      continue;
    }
    if (r.kind === "grit") {
      const g = typeof v === "string" ? parseGrit(v) : null;
      if (g === null) {
        fail(r.key, `“${String(v)}” is not a P-grade of coated abrasives. Enter the grit printed on the back of the paper, like P180, P240 or P320.`);
        continue;
      }
      values[r.key] = g;
      if (!inWindow(r, g)) outOfWindow.push({ key: r.key, label: r.label, value: g, unit: null, window: windowText(r), shown: gritText(g), miss: missText(r, g) });
      continue;
    }
    const n = typeof v === "string" ? parseReadingNumber(v) : null;
    if (n === null) {
      fail(r.key, `“${String(v)}” is not a number. Enter the ${what}${unit}, like 12 or 12,5.`);
      continue;
    }
    if (r.equals !== undefined && Math.abs(n - r.equals) > READING_EPSILON) {
      fail(
        r.key,
        r.key === "coat"
          ? `This step is coat ${formatNumber(r.equals)}; you entered ${formatNumber(n)}.`
          : `This step needs ${what} ${formatNumber(r.equals)}; you entered ${formatNumber(n)}.`,
      );
      continue;
    }
    values[r.key] = n;
    if (!inWindow(r, n)) outOfWindow.push({ key: r.key, label: r.label, value: n, unit: r.unit, window: windowText(r), miss: missText(r, n) });
  }

  if (Object.keys(fieldErrors).length > 0) return { ok: false, fieldErrors };
  return { ok: true, values, outOfWindow };
}

/** A recorded reading for people: "137 °C", "P240", "passed", a lot as written. */
export function readingValueText(spec: ReadingSpec | undefined, value: ReadingValue): string {
  if (typeof value === "boolean") return value ? "passed" : "not passed";
  if (typeof value === "string") return value;
  if (spec?.kind === "grit") return gritText(value);
  return `${formatNumber(value)}${spec?.unit ? ` ${spec.unit}` : ""}`;
}

// ——— asking before an out-of-window reading is recorded ———

/** "Platen temperature 141 °C is outside 135–140 °C", "Inspector's check: surface fit for lacquer not passed". */
export function outOfWindowText(o: OutOfWindow): string {
  if (typeof o.value === "boolean") return `${o.label}: ${o.miss}`;
  if (o.shown) return `${o.label} ${o.shown} is ${o.miss}`;
  return `${o.label} ${formatNumber(o.value)}${o.unit ? ` ${o.unit}` : ""} is ${o.miss}`;
}

/** The one question asked before readings out of their window are recorded and open a nonconformance. */
export function outOfWindowQuestion(out: OutOfWindow[]): string {
  const parts = out.map((o, i) => (i === 0 ? outOfWindowText(o) : lcFirst(outOfWindowText(o))));
  return `${joinAnd(parts)}: record ${out.length === 1 ? "it" : "them"} and open a nonconformance?`;
}

/**
 * What a confirmation names: each out-of-window reading and its value. The server records only
 * when the confirmation sent names exactly the readings it is about to record, so a reading changed
 * after the question is asked about again.
 */
export function outOfWindowConfirmation(out: OutOfWindow[]): string {
  return out
    .map((o) => `${o.key}=${String(o.value)}`)
    .sort()
    .join("&");
}

// ——— the next step, now ———

export interface NextStepNow {
  /** The pair's next step: the earliest next step of its cabinets (null when the route is finished). */
  step: StepSpec | null;
  /** The cabinets at that step that may start it now. */
  ready: Side[];
  /**
   * The cabinets at that step that may not start it now, and why: the very refusal `checkStep`
   * gives a step started now (an open nonconformance, or a hold and the minute it is allowed from).
   */
  blocked: { sides: Side[]; reason: string; allowedAt?: Date } | null;
}

/** What a page offers for the pair's next step now: which cabinets may do it, and why the others may not. */
export function nextStepNow(spec: RouteSpec | StepSpec[], history: RouteEntry[], sides: Side[], now: Date): NextStepNow {
  const pos = position(spec, history, sides, now);
  const step = pos.cabinets.map((c) => c.next).filter((s): s is StepSpec => s !== null).sort((a, b) => a.seq - b.seq)[0] ?? null;
  if (!step) return { step: null, ready: [], blocked: null };
  const at = pos.cabinets.filter((c) => c.next?.seq === step.seq).map((c) => c.side);
  const ready = at.filter((side) => checkStep(spec, history, { seq: step.seq, cabinets: [side], startedAt: now }, now).ok);
  const held = at.filter((side) => !ready.includes(side));
  if (!held.length) return { step, ready, blocked: null };
  const check = checkStep(spec, history, { seq: step.seq, cabinets: held, startedAt: now }, now);
  if (check.ok) return { step, ready: at, blocked: null };
  return { step, ready, blocked: { sides: held, reason: check.reason, ...(check.allowedAt ? { allowedAt: check.allowedAt } : {}) } };
}
