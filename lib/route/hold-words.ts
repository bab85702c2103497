import type { HoldSpec } from "./types";

const DAY_MINUTES = 24 * 60;

/** 240 → "4 h", 20160 → "14 days", 90 → "1 h 30 min", 45 → "45 min". */
export function durationText(minutes: number): string {
  if (minutes >= DAY_MINUTES && minutes % DAY_MINUTES === 0) {
    const d = minutes / DAY_MINUTES;
    return `${d} ${d === 1 ? "day" : "days"}`;
  }
  if (minutes >= 60 && minutes % 60 === 0) return `${minutes / 60} h`;
  if (minutes > 60) return `${Math.floor(minutes / 60)} h ${minutes % 60} min`;
  return `${minutes} min`;
}

/** "then wait 4 h from the start: clamp 2 h and rest 2 h". */
export function holdText(h: HoldSpec): string {
  return `then wait ${durationText(h.minutes)} ${h.from === "start" ? "from the start" : "from when it is recorded"}: ${h.label}`;
}
