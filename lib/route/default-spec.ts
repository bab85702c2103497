import type { HoldSpec, ReadingSpec, StepSpec } from "./types";

const MIN = 1;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;

/**
 * The demo workshop's route for a veneered or lacquered cabinet pair. The values are common
 * practice, as the workshop states them (no published source): press at 135–140 °C for 20–25
 * minutes; trimming to ±0.2 mm; braces clamped 2 h and rested 2 h more before the next step; 4
 * coats each stoved, flatting back, 4 more coats (8 in all); 2 weeks of curing after the last
 * coat before polishing; a machine polishing cycle of about 70 minutes, then polishing by hand; a
 * hand check after machine sanding and after machine polishing. Sanding and flatting record the
 * abrasive's P-grade (FEPA / ISO 6344 P-scale; which grit where is common practice, see below);
 * every coat records its lacquer lot, its wet film thickness, and (stoved coats) the oven
 * temperature, and carries the wait before the next coat (see `coat`).
 */
export function defaultRoute(): StepSpec[] {
  const steps: Omit<StepSpec, "seq">[] = [
    {
      key: "press",
      name: "Forming press",
      station: "press",
      readings: [
        { key: "platenC", label: "Platen temperature", unit: "°C", kind: "number", min: 135, max: 140 },
        { key: "minutes", label: "Time in the press", unit: "min", kind: "number", min: 20, max: 25 },
      ],
      note: "135–140 °C for 20–25 minutes (common practice).",
    },
    {
      key: "trim",
      name: "Trimming",
      station: "trim",
      readings: [{ key: "deviationMm", label: "Trim deviation", unit: "mm", kind: "number", absMax: 0.2 }],
      note: "Accurate to ±0.2 mm (common practice).",
    },
    {
      key: "brace",
      name: "Brace fitting",
      station: "brace",
      readings: [{ key: "clampMinutes", label: "Time under clamp", unit: "min", kind: "number", min: 120 }],
      holdAfter: { minutes: 4 * HOUR, from: "start", label: "clamp 2 h and rest 2 h" },
      note: "Held under clamp pressure 2 hours, then 2 more hours at rest to cure, before the next step (common practice).",
    },
    {
      key: "sanding",
      name: "Machine sanding",
      station: "sanding",
      readings: [{ key: "grit", label: "Finishing grit", unit: null, kind: "grit", min: 180, max: 240 }],
      note: "Veneer is sanded last at P180–P240 before lacquer (common practice): coarser leaves scratches the lacquer shows, finer closes the grain.",
    },
    { key: "check-sanding", name: "Hand check after sanding", station: "inspection", readings: [{ key: "pass", label: "Inspector's check: surface fit for lacquer", unit: null, kind: "check" }] },
    ...[1, 2, 3, 4].map((n) => coat(n)),
    {
      key: "flatting",
      name: "Flatting back",
      station: "flatting",
      readings: [{ key: "grit", label: "Flatting grit", unit: null, kind: "grit", min: 320, max: 600 }],
      note: "After the first four coats, before the next four, with P320–P600 (common practice): fine enough to leave no scratch under the next coat.",
    },
    ...[5, 6, 7, 8].map((n) => coat(n)),
    {
      key: "machine-polish",
      name: "Machine polishing",
      station: "polish",
      readings: [{ key: "cycleMinutes", label: "Polishing cycle", unit: "min", kind: "number", min: 60, max: 80 }],
      note: "A cycle of about 70 minutes (common practice; the window 60–80 min is the demo workshop's).",
    },
    { key: "check-polish", name: "Hand check after polishing", station: "inspection", readings: [{ key: "pass", label: "Inspector's check: finish even, no burn-through", unit: null, kind: "check" }] },
    { key: "hand-finish", name: "Hand polishing and finish", station: "finish", readings: [] },
  ];
  return steps.map((s, i) => ({ ...s, seq: i + 1 }));
}

/**
 * Coats 1–4 (the build coats, flatted back afterwards) are stoved: the oven's temperature is read,
 * and the next coat waits for the stoving and for the cabinet to cool. Coats 5–7 (the top coats)
 * dry in the air: the next coat waits for the solvent to flash off. Coat 8's wait is the cure.
 * Figures from memory of a two-pack polyurethane lacquer maker's typical data sheet (not a source
 * to cite): flash-off 15–30 min between coats at 20 °C; forced drying 30 min at 50–60 °C, then
 * cooling to room temperature before the next coat; about 100 µm wet film a coat (80–120 µm).
 * The 45–60 °C window and the hour's wait after stoving are the demo workshop's (common practice).
 */
export function coat(n: number): Omit<StepSpec, "seq"> {
  const stoved = n <= 4;
  const last = n === 8;
  const readings: ReadingSpec[] = [
    { key: "coat", label: "Coat number", unit: null, kind: "number", equals: n },
    { key: "lacquerLot", label: "Lacquer lot", unit: null, kind: "text", maxLength: 40, lot: true },
    ...(stoved ? [{ key: "ovenC", label: "Oven temperature", unit: "°C", kind: "number", min: 45, max: 60 } satisfies ReadingSpec] : []),
    { key: "wetFilmUm", label: "Wet film thickness", unit: "µm", kind: "number", min: 80, max: 120 },
  ];
  const holdAfter: HoldSpec = last
    ? { minutes: 14 * DAY, from: "end", label: "curing, 2 weeks after the last coat" }
    : stoved
      ? { minutes: HOUR, from: "end", label: "stoving 30 min, then cool-down" }
      : { minutes: 30 * MIN, from: "end", label: "flash-off" };
  return {
    key: `coat-${n}`,
    name: `Lacquer coat ${n}, ${stoved ? "stoved" : "air-dried"}`,
    station: "lacquer",
    readings,
    holdAfter,
    note: last
      ? "The last of 8 coats, air-dried: curing starts when it is recorded (common practice)."
      : stoved
        ? "Stoved in the oven at 45–60 °C for 30 minutes, then left to cool; the next coat waits an hour from when this one is recorded."
        : "Left to flash off in the air: the next coat waits 30 minutes from when this one is recorded.",
  };
}

/**
 * The demo workshop's route for a bought-in metal trim part (a top housing, a plinth, a bezel).
 * Common practice, as the workshop states it (no published source): sand the machined part, hand
 * check the surface, hand paint it in three coats, let the last coat cure 24 hours, read the dry
 * film thickness (the demo workshop's window: 60–120 µm over the three coats), polish by hand, and
 * inspect it before it goes to assembly. Kept to numbers and checks on purpose: the coat readings
 * of the cabinet route (lacquer lot, oven temperature) are not asked of a hand-painted part.
 */
export function defaultTrimRoute(): StepSpec[] {
  const steps: Omit<StepSpec, "seq">[] = [
    { key: "trim-sanding", name: "Sanding, machine and hand", station: "metal-sanding", readings: [], note: "Machine sanding of the machined faces, then by hand at the edges (common practice)." },
    { key: "trim-check-sanding", name: "Hand check after sanding", station: "inspection", readings: [{ key: "pass", label: "Inspector's check: no tool marks, edges even", unit: null, kind: "check" }] },
    ...[1, 2, 3].map(
      (n): Omit<StepSpec, "seq"> => ({
        key: `trim-paint-${n}`,
        name: `Hand painting, coat ${n}`,
        station: "paint",
        readings: [{ key: "coat", label: "Coat number", unit: null, kind: "number", equals: n }],
        ...(n === 3 ? { holdAfter: { minutes: 24 * HOUR, from: "end" as const, label: "curing, 24 h after the last coat" } } : {}),
        note: n === 3 ? "The last of 3 coats: curing starts when it is recorded (common practice)." : "Painted by hand (common practice).",
      }),
    ),
    {
      key: "trim-film",
      name: "Dry film reading",
      station: "inspection",
      readings: [{ key: "filmUm", label: "Dry film thickness", unit: "µm", kind: "number", min: 60, max: 120 }],
      note: "Read with a film gauge after curing (common practice; the window 60–120 µm is the demo workshop's).",
    },
    { key: "trim-polish", name: "Hand polishing", station: "finish", readings: [] },
    { key: "trim-inspection", name: "Final inspection", station: "inspection", readings: [{ key: "pass", label: "Inspector's check: finish even, no runs or burn-through", unit: null, kind: "check" }] },
  ];
  return steps.map((s, i) => ({ ...s, seq: i + 1 }));
}
