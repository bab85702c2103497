"use client";
import { useActionState, useEffect, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { SelectField, TextAreaField, TextField } from "@/components/ui/field";
import { submitKeepingFields } from "@/components/ui/kept-form";
import { Notice } from "@/components/ui/notice";
import { initialFormState, type FormState } from "@/lib/form-state";
import { READING_KINDS, type ReadingKind, type StepSpec } from "@/lib/route/types";
import { ROUTE_STATIONS, STATION_NAME } from "@/lib/vocabulary/stations";
import type { RouteKind } from "@/lib/vocabulary/route-kinds";
import { saveRouteVersionAction } from "../../actions";
import * as draft from "./draft";
import type { HoldUnit, Layout, ReadingDraft, StepDraft } from "./draft";

const STATION_OPTIONS = [{ value: "", label: "Choose a station…" }, ...ROUTE_STATIONS.map((s) => ({ value: s, label: STATION_NAME[s] }))];
const KIND_OPTIONS = [
  { value: "number", label: "A number" },
  { value: "check", label: "Inspector's check (pass or fail)" },
  { value: "text", label: "A text, such as a lot (no window)" },
  { value: "grit", label: "An abrasive grit (P-grade)" },
];
const asKind = (v: string): ReadingKind => (READING_KINDS as readonly string[]).includes(v) ? (v as ReadingKind) : "number";
const UNIT_OPTIONS: { value: HoldUnit; label: string }[] = [
  { value: "min", label: "minutes" },
  { value: "h", label: "hours" },
  { value: "d", label: "days" },
];
const FROM_OPTIONS = [
  { value: "start", label: "from when it started" },
  { value: "end", label: "from when it is recorded" },
];

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

/** The errors of one step or reading, and a way to say the person has edited a field since. */
interface FieldErrors {
  of: (uid: string, field: string) => string[] | undefined;
  others: (uid: string, shown: ReadonlySet<string>) => string[];
}

type Result = { state: FormState; layout: Layout | null };

export function RouteEditForm({ model, routeKind = "cabinet", baseVersion, steps: initial }: { model: { id: string; code: string }; routeKind?: RouteKind; baseVersion: number; steps: StepSpec[] }) {
  const [steps, setSteps] = useState<StepDraft[]>(() => draft.draftOf(initial));
  const [note, setNote] = useState("");
  const [result, action, pending] = useActionState<Result, FormData>(
    async (_prev, formData) => {
      const layout = JSON.parse(String(formData.get("layout") ?? "null")) as Layout | null;
      // Only what the server reads: the visible fields are already in the steps' JSON.
      const sent = new FormData();
      for (const k of ["modelId", "routeKind", "baseVersion", "steps", "note"]) {
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
  const placed = draft.placeErrors(state.fieldErrors, result.layout);
  const errors: FieldErrors = {
    of: (id, field) => (clearedKeys.has(`${id}:${field}`) ? undefined : placed.byUid.get(id)?.[field]),
    others: (id, shown) => draft.otherErrors(placed.byUid.get(id), shown),
  };
  const noteErrors = clearedKeys.has("form:note") ? undefined : state.fieldErrors?.note;

  const edit = (change: (list: StepDraft[]) => StepDraft[], cleared?: { id: string; field: string }) => {
    setSteps(change);
    if (cleared) clear(cleared.id, cleared.field);
  };
  const startAgain = () => {
    setSteps(draft.draftOf(initial, `${draft.newUid()}s`));
    setNote("");
  };

  const submit = submitKeepingFields(action, pending);

  return (
    <form onSubmit={submit} className="flex flex-col gap-6" noValidate data-testid="route-edit-form" aria-busy={pending}>
      <input type="hidden" name="modelId" value={model.id} />
      <input type="hidden" name="routeKind" value={routeKind} />
      <input type="hidden" name="baseVersion" value={String(baseVersion)} />
      <input type="hidden" name="steps" value={JSON.stringify(draft.toSpec(steps))} />
      <input type="hidden" name="layout" value={JSON.stringify(draft.layoutOf(steps))} />

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
        {steps.map((s, i) => (
          <li key={s.uid} data-testid={`edit-step-${i + 1}`}>
            <StepFields step={s} index={i} count={steps.length} errors={errors} edit={edit} />
          </li>
        ))}
      </ol>

      <div>
        <Button variant="secondary" onClick={() => edit((list) => draft.insertStep(list, list.length))} data-testid="add-step">
          Add a step at the end
        </Button>
      </div>

      <section className="flex flex-col gap-4 rounded-xl border border-line bg-surface p-4">
        <TextAreaField
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

type Edit = (change: (list: StepDraft[]) => StepDraft[], cleared?: { id: string; field: string }) => void;

function StepFields({ step: s, index: i, count, errors, edit }: { step: StepDraft; index: number; count: number; errors: FieldErrors; edit: Edit }) {
  const hold = draft.previewHold(s);
  const set = (patch: Partial<StepDraft>, field: string) => edit((list) => draft.updateStep(list, s.uid, patch), { id: s.uid, field });
  return (
    <fieldset className="min-w-0 rounded-xl border border-line bg-surface p-4">
      <legend className="px-1 text-lg font-bold">
        Step {i + 1}
        {s.name.trim() ? `: ${s.name.trim()}` : ""}
      </legend>
      <div className="mb-3 flex flex-wrap gap-2">
        <Button size="sm" variant="secondary" onClick={() => edit((list) => draft.moveStep(list, i, -1))} disabled={i === 0} aria-label={`Move step ${i + 1} up`}>
          ↑ Up
        </Button>
        <Button size="sm" variant="secondary" onClick={() => edit((list) => draft.moveStep(list, i, 1))} disabled={i === count - 1} aria-label={`Move step ${i + 1} down`}>
          ↓ Down
        </Button>
        <Button size="sm" variant="secondary" onClick={() => edit((list) => draft.insertStep(list, i + 1))} aria-label={`Add a blank step after step ${i + 1}`}>
          Add a step after it
        </Button>
        <Button size="sm" variant="danger" onClick={() => edit((list) => draft.removeStep(list, s.uid))} aria-label={`Remove step ${i + 1}`}>
          Remove
        </Button>
      </div>
      <ErrorList messages={errors.others(s.uid, draft.STEP_FIELDS)} testId={`step-${i + 1}-errors`} />
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Name" name={`step-${s.uid}-name`} value={s.name} onChange={(e) => set({ name: e.target.value }, "name")} errors={errors.of(s.uid, "name")} />
        <TextField
          label="Key"
          name={`step-${s.uid}-key`}
          value={s.key}
          placeholder={draft.stepKeyFrom(s.name) || "e.g. coat-9"}
          onChange={(e) => set({ key: e.target.value }, "key")}
          hint={s.key ? undefined : "Empty: made from the name."}
          errors={errors.of(s.uid, "key")}
          className="font-mono"
          spellCheck={false}
          autoComplete="off"
        />
        <SelectField label="Station" name={`step-${s.uid}-station`} value={s.station} options={STATION_OPTIONS} onChange={(e) => set({ station: e.target.value }, "station")} errors={errors.of(s.uid, "station")} />
      </div>

      <div className="mt-4 flex flex-col gap-3">
        <p className="font-bold">Readings</p>
        <ErrorList messages={errors.of(s.uid, "readings") ?? []} />
        {s.readings.length === 0 ? <p className="text-ink-soft">No readings: the step is recorded as done.</p> : null}
        {s.readings.map((r, j) => (
          <ReadingFields key={r.uid} step={s} stepIndex={i} reading={r} index={j} errors={errors} edit={edit} />
        ))}
        <div>
          <Button size="sm" variant="secondary" onClick={() => edit((list) => draft.addReading(list, s.uid))} aria-label={`Add a reading to step ${i + 1}`}>
            Add a reading
          </Button>
        </div>
      </div>

      <div className="mt-4 flex flex-col gap-3">
        <p className="font-bold">
          Wait after it <span className="font-normal text-ink-soft">{hold ? `· ${hold}` : "· empty: the next step may start at once"}</span>
        </p>
        <ErrorList messages={errors.of(s.uid, "holdAfter") ?? []} />
        <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          <TextField
            label="How long"
            name={`step-${s.uid}-hold-amount`}
            inputMode="decimal"
            value={s.holdAmount}
            onChange={(e) => set({ holdAmount: e.target.value }, "holdAfter.minutes")}
            errors={errors.of(s.uid, "holdAfter.minutes")}
          />
          <SelectField label="In" name={`step-${s.uid}-hold-unit`} value={s.holdUnit} options={UNIT_OPTIONS} onChange={(e) => set({ holdUnit: e.target.value as HoldUnit }, "holdAfter.minutes")} />
          <SelectField
            label="Counted"
            name={`step-${s.uid}-hold-from`}
            value={s.holdFrom}
            options={FROM_OPTIONS}
            onChange={(e) => set({ holdFrom: e.target.value === "start" ? "start" : "end" }, "holdAfter.from")}
            errors={errors.of(s.uid, "holdAfter.from")}
          />
          <TextField
            label="What it is called"
            name={`step-${s.uid}-hold-label`}
            value={s.holdLabel}
            placeholder="curing"
            onChange={(e) => set({ holdLabel: e.target.value }, "holdAfter.label")}
            errors={errors.of(s.uid, "holdAfter.label")}
          />
        </div>
      </div>

      <div className="mt-4">
        <TextAreaField
          label="Note for the operator"
          name={`step-${s.uid}-note`}
          value={s.note}
          onChange={(e) => set({ note: e.target.value }, "note")}
          hint="What the step is and where its values come from, e.g. “(common practice)”."
          errors={errors.of(s.uid, "note")}
        />
      </div>
    </fieldset>
  );
}

function ReadingFields({ step: s, stepIndex: i, reading: r, index: j, errors, edit }: { step: StepDraft; stepIndex: number; reading: ReadingDraft; index: number; errors: FieldErrors; edit: Edit }) {
  const window = draft.previewWindow(r);
  const set = (patch: Partial<ReadingDraft>, field: string) => edit((list) => draft.updateReading(list, s.uid, r.uid, patch), { id: r.uid, field });
  const limit = (field: (typeof draft.LIMITS)[number], label: string, hint?: string) => (
    <TextField label={label} name={`reading-${r.uid}-${field}`} inputMode="decimal" value={r[field]} hint={hint} onChange={(e) => set({ [field]: e.target.value }, field)} errors={errors.of(r.uid, field)} />
  );
  return (
    <div className="rounded-lg border border-line bg-paper p-3" data-testid={`edit-step-${i + 1}-reading-${j + 1}`}>
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <p className="font-bold">
          Reading {j + 1}
          {window ? <span className="font-normal text-ink-soft"> · window: {window}</span> : null}
        </p>
        <div className="flex flex-wrap gap-2">
          <Button size="sm" variant="quiet" onClick={() => edit((list) => draft.moveReading(list, s.uid, j, -1))} disabled={j === 0} aria-label={`Move reading ${j + 1} of step ${i + 1} up`}>
            ↑ Up
          </Button>
          <Button size="sm" variant="quiet" onClick={() => edit((list) => draft.moveReading(list, s.uid, j, 1))} disabled={j === s.readings.length - 1} aria-label={`Move reading ${j + 1} of step ${i + 1} down`}>
            ↓ Down
          </Button>
          <Button size="sm" variant="quiet" onClick={() => edit((list) => draft.removeReading(list, s.uid, r.uid))} aria-label={`Remove reading ${j + 1} of step ${i + 1}`}>
            Remove reading
          </Button>
        </div>
      </div>
      <ErrorList messages={errors.others(r.uid, draft.READING_FIELDS)} />
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <div className="sm:col-span-2">
          <TextField label="Label" name={`reading-${r.uid}-label`} value={r.label} onChange={(e) => set({ label: e.target.value }, "label")} errors={errors.of(r.uid, "label")} />
        </div>
        <TextField
          label="Key"
          name={`reading-${r.uid}-key`}
          value={r.key}
          placeholder={draft.readingKeyFrom(r.label) || "e.g. platenC"}
          onChange={(e) => set({ key: e.target.value }, "key")}
          errors={errors.of(r.uid, "key")}
          className="font-mono"
          spellCheck={false}
          autoComplete="off"
        />
        <SelectField label="Kind" name={`reading-${r.uid}-kind`} value={r.kind} options={KIND_OPTIONS} onChange={(e) => set({ kind: asKind(e.target.value) }, "kind")} errors={errors.of(r.uid, "kind")} />
        {r.kind === "number" ? (
          <>
            <TextField label="Unit" name={`reading-${r.uid}-unit`} value={r.unit} placeholder="°C, min, mm" onChange={(e) => set({ unit: e.target.value }, "unit")} errors={errors.of(r.uid, "unit")} />
            {limit("min", "Lowest (min)")}
            {limit("max", "Highest (max)")}
            {limit("absMax", "± limit", "For a deviation from zero.")}
            {limit("equals", "Must equal", "E.g. the coat number.")}
          </>
        ) : r.kind === "grit" ? (
          <>
            <TextField label="Coarsest grit" name={`reading-${r.uid}-min`} value={r.min} placeholder="P180" hint="FEPA / ISO 6344 P-grade." onChange={(e) => set({ min: e.target.value }, "min")} errors={errors.of(r.uid, "min")} />
            <TextField label="Finest grit" name={`reading-${r.uid}-max`} value={r.max} placeholder="P240" onChange={(e) => set({ max: e.target.value }, "max")} errors={errors.of(r.uid, "max")} />
          </>
        ) : r.kind === "text" ? (
          <>
            <TextField label="Longest text (characters)" name={`reading-${r.uid}-maxLength`} inputMode="numeric" value={r.maxLength} placeholder="40" hint="Recorded as written; no window." onChange={(e) => set({ maxLength: e.target.value }, "maxLength")} errors={errors.of(r.uid, "maxLength")} />
            <label className="flex min-h-12 cursor-pointer items-center gap-3 self-end sm:col-span-2">
              <input type="checkbox" name={`reading-${r.uid}-lot`} checked={r.lot} onChange={(e) => set({ lot: e.target.checked }, "lot")} className="size-5 accent-leaf" />
              <span>It names a supplier&apos;s lot (such as the lacquer lot): the register traces the lot into the cabinets.</span>
            </label>
          </>
        ) : (
          <p className="self-end pb-3 text-ink-soft sm:col-span-2 lg:col-span-4">The inspector answers pass or fail; a fail opens a nonconformance.</p>
        )}
      </div>
    </div>
  );
}
