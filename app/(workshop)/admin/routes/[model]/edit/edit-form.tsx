"use client";
import { useActionState, useEffect, useId, useRef, useState, type ComponentProps, type ReactNode } from "react";
import { submitKeepingFields } from "@/components/ui/kept-form";
import { Button } from "@/components/ui/button";
import { controlClasses, SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { cx } from "@/components/ui/cx";
import { initialFormState, type FormState } from "@/lib/forms";
import { windowText } from "@/lib/route/rules";
import type { ReadingSpec, StepSpec } from "@/lib/route/types";
import { ROUTE_STATIONS } from "@/lib/vocabulary/stations";
import { saveRouteVersionAction } from "../../actions";
import { STATION_NAME } from "@/lib/vocabulary/stations";
import { holdText } from "@/lib/route/spec-rules";

// ---- the draft: what the form edits, as typed ---------------------------------------------------

type HoldUnit = "min" | "h" | "d";
const UNIT_MINUTES: Record<HoldUnit, number> = { min: 1, h: 60, d: 24 * 60 };

interface ReadingDraft {
  uid: string;
  key: string;
  label: string;
  unit: string;
  kind: "number" | "check";
  min: string;
  max: string;
  absMax: string;
  equals: string;
}

interface StepDraft {
  uid: string;
  key: string;
  name: string;
  station: string;
  readings: ReadingDraft[];
  holdAmount: string;
  holdUnit: HoldUnit;
  holdFrom: "start" | "end";
  holdLabel: string;
  note: string;
}

// The steps and readings the page starts with have ids from their places (the same on the server
// and in the browser); those added while editing are numbered here, in the browser only.
let uidCounter = 0;
const newUid = () => `n${++uidCounter}`;
const numText = (n: number | undefined) => (n === undefined ? "" : String(n));

function readingDraft(r?: ReadingSpec, id: string = newUid()): ReadingDraft {
  return {
    uid: id,
    key: r?.key ?? "",
    label: r?.label ?? "",
    unit: r?.unit ?? "",
    kind: r?.kind ?? "number",
    min: numText(r?.min),
    max: numText(r?.max),
    absMax: numText(r?.absMax),
    equals: numText(r?.equals),
  };
}

function stepDraft(s?: StepSpec, id: string = newUid()): StepDraft {
  const m = s?.holdAfter?.minutes;
  const unit: HoldUnit = m === undefined ? "h" : m % UNIT_MINUTES.d === 0 ? "d" : m % UNIT_MINUTES.h === 0 ? "h" : "min";
  return {
    uid: id,
    key: s?.key ?? "",
    name: s?.name ?? "",
    station: s?.station ?? "",
    readings: (s?.readings ?? []).map((r, j) => readingDraft(r, `${id}r${j}`)),
    holdAmount: m === undefined ? "" : String(m / UNIT_MINUTES[unit]),
    holdUnit: unit,
    holdFrom: s?.holdAfter?.from ?? "end",
    holdLabel: s?.holdAfter?.label ?? "",
    note: s?.note ?? "",
  };
}

/** "Lacquer coat 9, stoved" → "lacquer-coat-9-stoved": the key a new step gets when none is typed. */
const slug = (text: string) =>
  text
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40)
    .replace(/-+$/, "");

/** "Platen temperature" → "platenTemperature": the key a new reading gets when none is typed. */
const camel = (text: string) => {
  const words = slug(text).split("-").filter(Boolean);
  const out = words.map((w, i) => (i === 0 ? w : w[0]!.toUpperCase() + w.slice(1))).join("").replace(/^[0-9]+/, "");
  return out.slice(0, 40);
};

/** A number as typed ("0,2", "−0.15"); empty is none; anything else goes as typed, for the server to refuse. */
function numberOrText(text: string): number | string | undefined {
  const t = text.trim().replace(/^[\u2212\u2013]/, "-").replace(",", ".");
  if (t === "") return undefined;
  const n = Number(t);
  return /^[+-]?(\d+\.?\d*|\.\d+)$/.test(t) && Number.isFinite(n) ? n : text;
}

/** The draft as the StepSpec[] the server checks (seq is numbered there). */
function toSpec(steps: StepDraft[]) {
  return steps.map((s) => {
    const out: Record<string, unknown> = {
      key: s.key.trim() || slug(s.name),
      name: s.name,
      station: s.station,
      readings: s.readings.map((r) => {
        const o: Record<string, unknown> = { key: r.key.trim() || camel(r.label), label: r.label, unit: r.kind === "check" ? null : r.unit.trim() || null, kind: r.kind };
        if (r.kind === "number") {
          for (const k of ["min", "max", "absMax", "equals"] as const) {
            const v = numberOrText(r[k]);
            if (v !== undefined) o[k] = v;
          }
        }
        return o;
      }),
    };
    if (s.holdAmount.trim() || s.holdLabel.trim()) {
      const amount = numberOrText(s.holdAmount);
      const hold: Record<string, unknown> = { from: s.holdFrom, label: s.holdLabel };
      if (typeof amount === "number") hold.minutes = Math.round(amount * UNIT_MINUTES[s.holdUnit] * 1e6) / 1e6;
      else if (amount !== undefined) hold.minutes = amount;
      out.holdAfter = hold;
    }
    if (s.note.trim()) out.note = s.note;
    return out;
  });
}

/** The window of a reading as typed, or null while a number in it is not one yet. */
function previewWindow(r: ReadingDraft): string | null {
  if (r.kind === "check") return "pass";
  const spec: ReadingSpec = { key: "x", label: r.label, unit: r.unit.trim() || null, kind: "number" };
  for (const k of ["min", "max", "absMax", "equals"] as const) {
    const v = numberOrText(r[k]);
    if (typeof v === "string") return null;
    if (v !== undefined) spec[k] = v;
  }
  return windowText(spec);
}

function previewHold(s: StepDraft): string | null {
  const amount = numberOrText(s.holdAmount);
  if (typeof amount !== "number" || !s.holdLabel.trim()) return null;
  const minutes = Math.round(amount * UNIT_MINUTES[s.holdUnit]);
  return minutes >= 1 ? holdText({ minutes, from: s.holdFrom, label: s.holdLabel.trim() }) : null;
}

// ---- errors, keyed by the place they were sent from ---------------------------------------------

interface Layout {
  steps: { uid: string; readings: string[] }[];
}

interface Placed {
  /** Field errors of a step or reading by its uid, then by its field ("" for the step or reading as a whole). */
  byUid: Map<string, Record<string, string[]>>;
  general: string[];
  /** How many fields below have an error (those not tied to one are in `general`). */
  count: number;
}

/** Turns "steps.3.readings.0.max" into the error of that reading's max, wherever the step has moved since. */
function placeErrors(fieldErrors: FormState["fieldErrors"], layout: Layout | null): Placed {
  const byUid = new Map<string, Record<string, string[]>>();
  const general: string[] = [];
  let count = 0;
  const put = (id: string, field: string, msgs: string[]) => {
    const rec = byUid.get(id) ?? {};
    rec[field] = [...(rec[field] ?? []), ...msgs];
    byUid.set(id, rec);
  };
  for (const [key, msgs] of Object.entries(fieldErrors ?? {})) {
    if (!msgs?.length) continue;
    if (key === "note") {
      count++;
      continue;
    }
    const m = /^steps\.(\d+)(?:\.(.+))?$/.exec(key);
    const step = m && layout ? layout.steps[Number(m[1])] : undefined;
    if (!m || !step) {
      general.push(...msgs);
      continue;
    }
    count++;
    const rest = m[2] ?? "";
    const r = /^readings\.(\d+)(?:\.(.+))?$/.exec(rest);
    const reading = r ? step.readings[Number(r[1])] : undefined;
    if (r && reading) put(reading, r[2] ?? "", msgs);
    else put(step.uid, rest, msgs);
  }
  return { byUid, general, count };
}

// ---- small pieces -------------------------------------------------------------------------------

function TextArea({ label, hint, errors, className, ...props }: Omit<ComponentProps<"textarea">, "id"> & { label: ReactNode; hint?: ReactNode; errors?: string[] }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1.5">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      <textarea
        id={id}
        rows={2}
        className={cx(controlClasses, "py-2", className)}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={[hint ? `${id}-hint` : "", errors?.length ? `${id}-error` : ""].filter(Boolean).join(" ") || undefined}
        {...props}
      />
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {errors?.length ? (
        <p id={`${id}-error`} className="text-sm font-bold text-danger">
          {errors.join(" ")}
        </p>
      ) : null}
    </div>
  );
}

function ErrorList({ messages, testId }: { messages: string[]; testId?: string }) {
  if (!messages.length) return null;
  return (
    <ul className="list-inside list-disc text-sm font-bold text-danger" data-testid={testId}>
      {messages.map((m, i) => (
        <li key={i}>{m}</li>
      ))}
    </ul>
  );
}

const STATION_OPTIONS = [{ value: "", label: "Choose a station…" }, ...ROUTE_STATIONS.map((s) => ({ value: s, label: STATION_NAME[s] }))];
const KIND_OPTIONS = [
  { value: "number", label: "A number" },
  { value: "check", label: "Inspector's check (pass or fail)" },
];
const UNIT_OPTIONS = [
  { value: "min", label: "minutes" },
  { value: "h", label: "hours" },
  { value: "d", label: "days" },
];
const FROM_OPTIONS = [
  { value: "start", label: "from when it started" },
  { value: "end", label: "from when it is recorded" },
];

const STEP_FIELDS = new Set(["key", "name", "station", "note", "holdAfter.minutes", "holdAfter.from", "holdAfter.label"]);
const READING_FIELDS = new Set(["key", "label", "unit", "kind", "min", "max", "absMax", "equals"]);
const others = (rec: Record<string, string[]> | undefined, known: Set<string>) =>
  Object.entries(rec ?? {})
    .filter(([k]) => !known.has(k))
    .flatMap(([, v]) => v);

// ---- the form -----------------------------------------------------------------------------------

type Result = { state: FormState; layout: Layout | null };

export function RouteEditForm({ model, baseVersion, steps: initial }: { model: { id: string; code: string }; baseVersion: number; steps: StepSpec[] }) {
  const fromSpec = () => initial.map((s, i) => stepDraft(s, `s${i}`));
  const [steps, setSteps] = useState<StepDraft[]>(fromSpec);
  const [note, setNote] = useState("");
  const [result, action, pending] = useActionState<Result, FormData>(
    async (_prev, formData) => {
      const layout = JSON.parse(String(formData.get("layout") ?? "null")) as Layout | null;
      // Only what the server reads: the visible fields are already in the steps' JSON.
      const sent = new FormData();
      for (const k of ["modelId", "baseVersion", "steps", "note"]) {
        const v = formData.get(k);
        if (typeof v === "string") sent.set(k, v);
      }
      return { state: await saveRouteVersionAction(undefined, sent), layout };
    },
    { state: initialFormState, layout: null },
  );
  // An error disappears once its field is edited; a new answer from the server brings them all back.
  const [cleared, setCleared] = useState<{ for: Result; keys: Set<string> }>({ for: result, keys: new Set() });
  const clearedKeys = cleared.for === result ? cleared.keys : new Set<string>();
  const clear = (id: string, field: string) => setCleared({ for: result, keys: new Set(clearedKeys).add(`${id}:${field}`) });

  const { state } = result;
  // A refusal is shown at the top of a long form: bring it into view when it arrives.
  const noticeRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!result.state.ok && result.state.message) noticeRef.current?.focus();
  }, [result]);
  const placed = placeErrors(state.fieldErrors, result.layout);
  const err = (id: string, field: string) => (clearedKeys.has(`${id}:${field}`) ? undefined : placed.byUid.get(id)?.[field]);
  const noteErrors = clearedKeys.has("form:note") ? undefined : state.fieldErrors?.note;

  const layout: Layout = { steps: steps.map((s) => ({ uid: s.uid, readings: s.readings.map((r) => r.uid) })) };

  const updateStep = (id: string, patch: Partial<StepDraft>, field?: string) => {
    setSteps((list) => list.map((s) => (s.uid === id ? { ...s, ...patch } : s)));
    if (field) clear(id, field);
  };
  const updateReading = (stepId: string, readingId: string, patch: Partial<ReadingDraft>, field?: string) => {
    setSteps((list) => list.map((s) => (s.uid === stepId ? { ...s, readings: s.readings.map((r) => (r.uid === readingId ? { ...r, ...patch } : r)) } : s)));
    if (field) clear(readingId, field);
  };
  const move = (index: number, by: -1 | 1) =>
    setSteps((list) => {
      const to = index + by;
      if (to < 0 || to >= list.length) return list;
      const next = [...list];
      [next[index], next[to]] = [next[to]!, next[index]!];
      return next;
    });
  const insertAt = (index: number) => setSteps((list) => [...list.slice(0, index), stepDraft(), ...list.slice(index)]);
  const remove = (id: string) => setSteps((list) => list.filter((s) => s.uid !== id));
  const startAgain = () => {
    setSteps(initial.map((s) => stepDraft(s)));
    setNote("");
  };

  const submit = submitKeepingFields(action, pending);

  return (
    <form onSubmit={submit} className="flex flex-col gap-6" noValidate data-testid="route-edit-form" aria-busy={pending}>
      <input type="hidden" name="modelId" value={model.id} />
      <input type="hidden" name="baseVersion" value={String(baseVersion)} />
      <input type="hidden" name="steps" value={JSON.stringify(toSpec(steps))} />
      <input type="hidden" name="layout" value={JSON.stringify(layout)} />

      {!state.ok && state.message ? (
        <div ref={noticeRef} tabIndex={-1} className="scroll-mt-24 outline-none">
          <Notice tone="danger" testId="route-edit-error" title={state.message}>
            {placed.count > 0 ? <p>{placed.count === 1 ? "One field is marked below." : `${placed.count} fields are marked below.`} Nothing was saved.</p> : <p>Nothing was saved.</p>}
            <ErrorList messages={placed.general} testId="route-edit-general-errors" />
          </Notice>
        </div>
      ) : null}

      <p className="text-ink-soft">
        {steps.length} {steps.length === 1 ? "step" : "steps"}, in the order the cabinets go through them. The steps are numbered again when you save. Keys name steps and readings in the records; keep them when a step only changes its words.
      </p>

      <ol className="flex flex-col gap-4" data-testid="route-edit-steps">
        {steps.map((s, i) => {
          const window = s.readings.map((r) => previewWindow(r));
          const hold = previewHold(s);
          return (
            <li key={s.uid} data-testid={`edit-step-${i + 1}`}>
              <fieldset className="rounded-xl border border-line bg-surface p-4">
                <legend className="px-1 text-lg font-bold">
                  Step {i + 1}
                  {s.name.trim() ? `: ${s.name.trim()}` : ""}
                </legend>
                <div className="mb-3 flex flex-wrap gap-2">
                  <Button size="sm" variant="secondary" onClick={() => move(i, -1)} disabled={i === 0} aria-label={`Move step ${i + 1} up`}>
                    ↑ Up
                  </Button>
                  <Button size="sm" variant="secondary" onClick={() => move(i, 1)} disabled={i === steps.length - 1} aria-label={`Move step ${i + 1} down`}>
                    ↓ Down
                  </Button>
                  <Button size="sm" variant="secondary" onClick={() => insertAt(i + 1)} aria-label={`Add a blank step after step ${i + 1}`}>
                    Add a step after it
                  </Button>
                  <Button size="sm" variant="danger" onClick={() => remove(s.uid)} aria-label={`Remove step ${i + 1}`}>
                    Remove
                  </Button>
                </div>
                <ErrorList messages={others(placed.byUid.get(s.uid), STEP_FIELDS)} testId={`step-${i + 1}-errors`} />
                <div className="grid gap-4 sm:grid-cols-3">
                  <TextField label="Name" name={`step-${s.uid}-name`} value={s.name} onChange={(e) => updateStep(s.uid, { name: e.target.value }, "name")} errors={err(s.uid, "name")} />
                  <TextField
                    label="Key"
                    name={`step-${s.uid}-key`}
                    value={s.key}
                    placeholder={slug(s.name) || "e.g. coat-9"}
                    onChange={(e) => updateStep(s.uid, { key: e.target.value }, "key")}
                    hint={s.key ? undefined : "Empty: made from the name."}
                    errors={err(s.uid, "key")}
                    className="font-mono"
                    spellCheck={false}
                    autoComplete="off"
                  />
                  <SelectField label="Station" name={`step-${s.uid}-station`} value={s.station} options={STATION_OPTIONS} onChange={(e) => updateStep(s.uid, { station: e.target.value }, "station")} errors={err(s.uid, "station")} />
                </div>

                <div className="mt-4 flex flex-col gap-3">
                  <p className="font-bold">Readings</p>
                  {s.readings.length === 0 ? <p className="text-ink-soft">No readings: the step is recorded as done.</p> : null}
                  {s.readings.map((r, j) => (
                    <div key={r.uid} className="rounded-lg border border-line bg-paper p-3" data-testid={`edit-step-${i + 1}-reading-${j + 1}`}>
                      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
                        <p className="font-bold">
                          Reading {j + 1}
                          {window[j] ? <span className="font-normal text-ink-soft"> · window: {window[j]}</span> : null}
                        </p>
                        <Button
                          size="sm"
                          variant="quiet"
                          onClick={() => updateStep(s.uid, { readings: s.readings.filter((x) => x.uid !== r.uid) })}
                          aria-label={`Remove reading ${j + 1} of step ${i + 1}`}
                        >
                          Remove reading
                        </Button>
                      </div>
                      <ErrorList messages={others(placed.byUid.get(r.uid), READING_FIELDS)} />
                      <div className="grid gap-3 sm:grid-cols-4">
                        <div className="sm:col-span-2">
                          <TextField label="Label" name={`reading-${r.uid}-label`} value={r.label} onChange={(e) => updateReading(s.uid, r.uid, { label: e.target.value }, "label")} errors={err(r.uid, "label")} />
                        </div>
                        <TextField
                          label="Key"
                          name={`reading-${r.uid}-key`}
                          value={r.key}
                          placeholder={camel(r.label) || "e.g. platenC"}
                          onChange={(e) => updateReading(s.uid, r.uid, { key: e.target.value }, "key")}
                          errors={err(r.uid, "key")}
                          className="font-mono"
                          spellCheck={false}
                          autoComplete="off"
                        />
                        <SelectField
                          label="Kind"
                          name={`reading-${r.uid}-kind`}
                          value={r.kind}
                          options={KIND_OPTIONS}
                          onChange={(e) => updateReading(s.uid, r.uid, { kind: e.target.value === "check" ? "check" : "number" }, "kind")}
                          errors={err(r.uid, "kind")}
                        />
                        {r.kind === "number" ? (
                          <>
                            <TextField label="Unit" name={`reading-${r.uid}-unit`} value={r.unit} placeholder="°C, min, mm" onChange={(e) => updateReading(s.uid, r.uid, { unit: e.target.value }, "unit")} errors={err(r.uid, "unit")} />
                            <TextField label="Lowest (min)" name={`reading-${r.uid}-min`} inputMode="decimal" value={r.min} onChange={(e) => updateReading(s.uid, r.uid, { min: e.target.value }, "min")} errors={err(r.uid, "min")} />
                            <TextField label="Highest (max)" name={`reading-${r.uid}-max`} inputMode="decimal" value={r.max} onChange={(e) => updateReading(s.uid, r.uid, { max: e.target.value }, "max")} errors={err(r.uid, "max")} />
                            <TextField
                              label="± limit"
                              name={`reading-${r.uid}-absMax`}
                              inputMode="decimal"
                              value={r.absMax}
                              hint="For a deviation from zero."
                              onChange={(e) => updateReading(s.uid, r.uid, { absMax: e.target.value }, "absMax")}
                              errors={err(r.uid, "absMax")}
                            />
                            <TextField
                              label="Must equal"
                              name={`reading-${r.uid}-equals`}
                              inputMode="decimal"
                              value={r.equals}
                              hint="E.g. the coat number."
                              onChange={(e) => updateReading(s.uid, r.uid, { equals: e.target.value }, "equals")}
                              errors={err(r.uid, "equals")}
                            />
                          </>
                        ) : (
                          <p className="self-end pb-3 text-ink-soft sm:col-span-4">The inspector answers pass or fail; a fail opens a nonconformance.</p>
                        )}
                      </div>
                    </div>
                  ))}
                  <div>
                    <Button size="sm" variant="secondary" onClick={() => updateStep(s.uid, { readings: [...s.readings, readingDraft()] })} aria-label={`Add a reading to step ${i + 1}`}>
                      Add a reading
                    </Button>
                  </div>
                </div>

                <div className="mt-4 flex flex-col gap-3">
                  <p className="font-bold">
                    Wait after it <span className="font-normal text-ink-soft">{hold ? `· ${hold}` : "· empty: the next step may start at once"}</span>
                  </p>
                  <ErrorList messages={err(s.uid, "holdAfter") ?? []} />
                  <div className="grid gap-3 sm:grid-cols-4">
                    <TextField
                      label="How long"
                      name={`step-${s.uid}-hold-amount`}
                      inputMode="decimal"
                      value={s.holdAmount}
                      onChange={(e) => updateStep(s.uid, { holdAmount: e.target.value }, "holdAfter.minutes")}
                      errors={err(s.uid, "holdAfter.minutes")}
                    />
                    <SelectField label="In" name={`step-${s.uid}-hold-unit`} value={s.holdUnit} options={UNIT_OPTIONS} onChange={(e) => updateStep(s.uid, { holdUnit: e.target.value as HoldUnit }, "holdAfter.minutes")} />
                    <SelectField
                      label="Counted"
                      name={`step-${s.uid}-hold-from`}
                      value={s.holdFrom}
                      options={FROM_OPTIONS}
                      onChange={(e) => updateStep(s.uid, { holdFrom: e.target.value === "start" ? "start" : "end" }, "holdAfter.from")}
                      errors={err(s.uid, "holdAfter.from")}
                    />
                    <TextField
                      label="What it is called"
                      name={`step-${s.uid}-hold-label`}
                      value={s.holdLabel}
                      placeholder="curing"
                      onChange={(e) => updateStep(s.uid, { holdLabel: e.target.value }, "holdAfter.label")}
                      errors={err(s.uid, "holdAfter.label")}
                    />
                  </div>
                </div>

                <div className="mt-4">
                  <TextArea
                    label="Note for the operator"
                    name={`step-${s.uid}-note`}
                    value={s.note}
                    onChange={(e) => updateStep(s.uid, { note: e.target.value }, "note")}
                    hint="What the step is and where its values come from, e.g. “(common practice)”."
                    errors={err(s.uid, "note")}
                  />
                </div>
              </fieldset>
            </li>
          );
        })}
      </ol>

      <div>
        <Button variant="secondary" onClick={() => insertAt(steps.length)} data-testid="add-step">
          Add a step at the end
        </Button>
      </div>

      <section className="flex flex-col gap-4 rounded-xl border border-line bg-surface p-4">
        <TextArea
          label="Why this change"
          name="note"
          value={note}
          onChange={(e) => {
            setNote(e.target.value);
            setCleared({ for: result, keys: new Set(clearedKeys).add("form:note") });
          }}
          hint="Kept with the version, for whoever reads the route later."
          errors={noteErrors}
          required
          data-testid="route-note"
        />
        <div className="flex flex-wrap gap-3">
          <Button type="submit" disabled={pending} aria-busy={pending} data-testid="save-route">
            {pending ? "Saving…" : `Save as version ${baseVersion + 1}`}
          </Button>
          <Button variant="quiet" onClick={startAgain}>
            Start again from {baseVersion ? `version ${baseVersion}` : "the usual route"}
          </Button>
        </div>
      </section>
    </form>
  );
}
