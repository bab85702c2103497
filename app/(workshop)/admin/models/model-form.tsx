"use client";
import { useActionState, useState } from "react";
import { Button } from "@/components/ui/button";
import { controlClasses, TextAreaField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { PART_TYPE_LABEL, PART_TYPES, type PartType } from "@/lib/vocabulary/part-types";
import type { ModelSpec } from "@/lib/workshop/model-spec";
import { saveModelAction } from "./actions";

type Errors = Record<string, string[] | undefined> | undefined;

/** Errors of one list and its rows: "positions" and "positions.2.count". */
function errorsOf(errors: Errors, prefix: string): string[] {
  return Object.entries(errors ?? {})
    .filter(([k]) => k === prefix || k.startsWith(`${prefix}.`))
    .flatMap(([k, v]) => {
      const m = /^[^.]+\.(\d+)\./.exec(k);
      return (v ?? []).map((msg) => (m ? `Row ${Number(m[1]) + 1}: ${msg}` : msg));
    });
}

function ListErrors({ id, messages }: { id: string; messages: string[] }) {
  if (!messages.length) return null;
  return (
    <p id={id} className="text-sm font-bold text-danger" data-testid={`${id}`}>
      {messages.join(" ")}
    </p>
  );
}

const small = `${controlClasses} min-w-0`;

/** A model's whole spec as a form: new (no `modelId`) or an edit saved as the next version. */
export function ModelForm({ initial, modelId, version, codeFixed }: { initial: ModelSpec; modelId?: string; version?: number; codeFixed?: string | null }) {
  const [state, action] = useActionState(saveModelAction, initialFormState);
  const v = (k: keyof ModelSpec | "note", fallback: string | number) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : String(fallback));
  const fe = state.fieldErrors;
  const [positions, setPositions] = useState(initial.positions.map((p) => ({ ...p, count: String(p.count) })));
  const [crossovers, setCrossovers] = useState(initial.crossovers.map((c) => ({ ...c, count: String(c.count) })));
  const [trims, setTrims] = useState(initial.trimPositions.map((t) => ({ ...t, count: String(t.count) })));
  const [limits, setLimits] = useState<Record<PartType, string>>(() => {
    const out = { tweeter: "", midrange: "", bass: "" } as Record<PartType, string>;
    for (const t of initial.tolerances) out[t.partType] = String(t.mismatchLimitDb);
    return out;
  });
  const tolerances = PART_TYPES.filter((t) => limits[t].trim() !== "").map((partType) => ({ partType, mismatchLimitDb: limits[partType] }));

  return (
    <form action={action} className="flex flex-col gap-6" noValidate data-testid="model-form">
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="model-form-error">
          {state.message}
        </Notice>
      ) : null}
      {modelId ? <input type="hidden" name="modelId" value={modelId} /> : null}
      {modelId ? <input type="hidden" name="baseVersion" value={String(version ?? 0)} /> : null}
      <input type="hidden" name="positions" value={JSON.stringify(positions)} />
      <input type="hidden" name="crossovers" value={JSON.stringify(crossovers)} />
      <input type="hidden" name="trimPositions" value={JSON.stringify(trims)} />
      <input type="hidden" name="tolerances" value={JSON.stringify(tolerances)} />

      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-lg font-bold">The model</legend>
        {codeFixed ? (
          <>
            <input type="hidden" name="code" value={initial.code} />
            <TextField label="Code" name="code-shown" value={initial.code} readOnly hint={codeFixed} errors={fe?.code} />
          </>
        ) : (
          <TextField label="Code" name="code" defaultValue={v("code", initial.code)} hint="2 to 4 capitals or digits, e.g. PW2. It goes into every serial, so it cannot change once a serial carries it." errors={fe?.code} autoComplete="off" data-testid="model-code" />
        )}
        <TextField label="Name" name="name" defaultValue={v("name", initial.name)} errors={fe?.name} autoComplete="off" data-testid="model-name" />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-lg font-bold">Veneer</legend>
        <TextField label="Leaves per face" name="leavesPerFace" inputMode="numeric" defaultValue={v("leavesPerFace", initial.leavesPerFace)} errors={fe?.leavesPerFace} />
        <TextField label="Smallest leaf length (mm)" name="minLeafLengthMm" inputMode="decimal" defaultValue={v("minLeafLengthMm", initial.minLeafLengthMm)} errors={fe?.minLeafLengthMm} />
        <TextField label="Smallest leaf width (mm)" name="minLeafWidthMm" inputMode="decimal" defaultValue={v("minLeafWidthMm", initial.minLeafWidthMm)} errors={fe?.minLeafWidthMm} />
      </fieldset>

      <fieldset className="flex flex-col gap-3" aria-describedby={errorsOf(fe, "positions").length ? "positions-error" : undefined}>
        <legend className="mb-2 text-lg font-bold">Drive-unit positions</legend>
        <p className="text-sm text-ink-soft">A position code names one place in each speaker (T, M, B1…); no code may be used twice across drive units, crossovers and trim parts.</p>
        {positions.map((p, i) => (
          <div key={i} className="grid grid-cols-[1fr_1.5fr_1fr_auto] items-end gap-2" data-testid={`position-row-${i}`}>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Position
              <input className={small} value={p.position} aria-label={`Position ${i + 1} code`} onChange={(e) => setPositions(positions.map((x, j) => (j === i ? { ...x, position: e.target.value.toUpperCase() } : x)))} />
            </label>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Part type
              <select className={small} value={p.partType} onChange={(e) => setPositions(positions.map((x, j) => (j === i ? { ...x, partType: e.target.value as PartType } : x)))}>
                {PART_TYPES.map((t) => (
                  <option key={t} value={t}>
                    {PART_TYPE_LABEL[t]}
                  </option>
                ))}
              </select>
            </label>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Count
              <input className={small} inputMode="numeric" value={p.count} onChange={(e) => setPositions(positions.map((x, j) => (j === i ? { ...x, count: e.target.value } : x)))} />
            </label>
            <Button variant="quiet" onClick={() => setPositions(positions.filter((_, j) => j !== i))} aria-label={`Remove position ${p.position || i + 1}`}>
              Remove
            </Button>
          </div>
        ))}
        <div>
          <Button variant="secondary" size="sm" onClick={() => setPositions([...positions, { position: "", partType: "tweeter", count: "1" }])}>
            Add a drive-unit position
          </Button>
        </div>
        <ListErrors id="positions-error" messages={errorsOf(fe, "positions")} />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3" aria-describedby={errorsOf(fe, "tolerances").length ? "tolerances-error" : undefined}>
        <legend className="mb-2 text-lg font-bold">Mismatch limit per part type (dB)</legend>
        {PART_TYPES.map((t) => (
          <label key={t} className="flex flex-col gap-1.5 font-bold">
            {PART_TYPE_LABEL[t]} (dB)
            <input className={controlClasses} inputMode="decimal" value={limits[t]} name={`limit-${t}`} onChange={(e) => setLimits({ ...limits, [t]: e.target.value })} />
          </label>
        ))}
        <div className="sm:col-span-3">
          <p className="text-sm text-ink-soft">The largest band difference allowed between a left and a right unit; leave a part type the model does not hold empty.</p>
          <ListErrors id="tolerances-error" messages={errorsOf(fe, "tolerances")} />
        </div>
      </fieldset>

      <fieldset className="flex flex-col gap-3" aria-describedby={errorsOf(fe, "crossovers").length ? "crossovers-error" : undefined}>
        <legend className="mb-2 text-lg font-bold">Crossover positions</legend>
        <p className="text-sm text-ink-soft">Every model has its board at XO, where assembly fits it; name more (XO-B) for a model with separate boards.</p>
        {crossovers.map((c, i) => (
          <div key={i} className="grid grid-cols-[1fr_1fr_auto] items-end gap-2">
            <label className="flex flex-col gap-1 text-sm font-bold">
              Position
              <input className={small} value={c.position} onChange={(e) => setCrossovers(crossovers.map((x, j) => (j === i ? { ...x, position: e.target.value.toUpperCase() } : x)))} />
            </label>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Count
              <input className={small} inputMode="numeric" value={c.count} onChange={(e) => setCrossovers(crossovers.map((x, j) => (j === i ? { ...x, count: e.target.value } : x)))} />
            </label>
            <Button variant="quiet" onClick={() => setCrossovers(crossovers.filter((_, j) => j !== i))} aria-label={`Remove crossover ${c.position || i + 1}`}>
              Remove
            </Button>
          </div>
        ))}
        <div>
          <Button variant="secondary" size="sm" onClick={() => setCrossovers([...crossovers, { position: "XO-", count: "1" }])}>
            Add a crossover position
          </Button>
        </div>
        <ListErrors id="crossovers-error" messages={errorsOf(fe, "crossovers")} />
      </fieldset>

      <fieldset className="flex flex-col gap-3" aria-describedby={errorsOf(fe, "trimPositions").length ? "trim-error" : undefined}>
        <legend className="mb-2 text-lg font-bold">Trim-part positions</legend>
        <p className="text-sm text-ink-soft">Metal parts fitted at assembly after their own route: a top housing, a plinth, a bezel.</p>
        {trims.map((t, i) => (
          <div key={i} className="grid grid-cols-[1fr_2fr_1fr_auto] items-end gap-2" data-testid={`trim-row-${i}`}>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Position
              <input className={small} value={t.position} data-testid={`trim-position-${i}`} onChange={(e) => setTrims(trims.map((x, j) => (j === i ? { ...x, position: e.target.value.toUpperCase() } : x)))} />
            </label>
            <label className="flex flex-col gap-1 text-sm font-bold">
              What it is
              <input className={small} value={t.label} data-testid={`trim-label-${i}`} onChange={(e) => setTrims(trims.map((x, j) => (j === i ? { ...x, label: e.target.value } : x)))} />
            </label>
            <label className="flex flex-col gap-1 text-sm font-bold">
              Count
              <input className={small} inputMode="numeric" value={t.count} onChange={(e) => setTrims(trims.map((x, j) => (j === i ? { ...x, count: e.target.value } : x)))} />
            </label>
            <Button variant="quiet" onClick={() => setTrims(trims.filter((_, j) => j !== i))} aria-label={`Remove trim position ${t.position || i + 1}`}>
              Remove
            </Button>
          </div>
        ))}
        <div>
          <Button variant="secondary" size="sm" onClick={() => setTrims([...trims, { position: "", label: "", count: "1" }])} data-testid="add-trim">
            Add a trim position
          </Button>
        </div>
        <ListErrors id="trim-error" messages={errorsOf(fe, "trimPositions")} />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-lg font-bold">Final pair test</legend>
        <TextField label="From (Hz)" name="responseMinHz" inputMode="decimal" defaultValue={v("responseMinHz", initial.responseMinHz)} errors={fe?.responseMinHz} />
        <TextField label="To (Hz)" name="responseMaxHz" inputMode="decimal" defaultValue={v("responseMaxHz", initial.responseMaxHz)} errors={fe?.responseMaxHz} />
        <TextField label="Left–right limit (dB)" name="pairResponseLimitDb" inputMode="decimal" defaultValue={v("pairResponseLimitDb", initial.pairResponseLimitDb)} errors={fe?.pairResponseLimitDb} />
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-lg font-bold">Selling it</legend>
        <TextField
          label="Pair GTIN-14"
          name="pairGtin"
          inputMode="numeric"
          defaultValue={v("pairGtin", initial.pairGtin)}
          hint="14 digits; the last is the GS1 check digit, checked here."
          errors={fe?.pairGtin}
          autoComplete="off"
          className="font-mono"
          data-testid="model-gtin"
        />
        <TextField label="Warranty (months)" name="warrantyMonths" inputMode="numeric" defaultValue={v("warrantyMonths", initial.warrantyMonths)} hint="0 to 600." errors={fe?.warrantyMonths} />
        <div className="sm:col-span-2">
          <TextAreaField
            label="Packing checklist"
            name="packingList"
            rows={4}
            defaultValue={typeof state.values?.packingList === "string" ? state.values.packingList : initial.packingList.join("\n")}
            hint="One item a line. The left and right speakers and the certificate always come first and need not be listed."
            errors={fe?.packingList}
          />
        </div>
      </fieldset>

      <TextAreaField
        label={modelId ? "Why it changes" : "Note (optional)"}
        name="note"
        defaultValue={v("note", "")}
        hint={modelId ? "Kept with the new version. Pairs already started keep the version they started under." : "Kept with version 1."}
        errors={fe?.note ?? fe?.baseVersion}
        data-testid="model-note"
      />
      <div>
        <SubmitButton pendingLabel="Saving…">{modelId ? "Save as a new version" : "Register the model"}</SubmitButton>
      </div>
    </form>
  );
}

