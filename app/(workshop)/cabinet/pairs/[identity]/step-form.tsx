"use client";
import { useActionState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import type { StepSpec } from "@/lib/route/types";
import { recordStepAction } from "../../actions/steps";

/**
 * The form for the pair's next step: which cabinets, when it started, and the step's readings.
 * Readings out of their window are not recorded at the first press: the server sends back the
 * question, and only the button that answers it records them and opens a nonconformance.
 */
export function StepForm({
  pair,
  pairId,
  step,
  sides,
  window,
  memberLabel = "Cabinet",
}: {
  pair: string;
  pairId: string;
  step: StepSpec;
  sides: { side: "L" | "R"; identity: string; ready: boolean; note?: string }[];
  window: Record<string, string>;
  /** What a group of one is called: "Cabinet" (a lone lacquer cabinet) or "Trim part". */
  memberLabel?: string;
}) {
  const [state, action] = useActionState(recordStepAction, initialFormState);
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : "");
  const keptSides = Array.isArray(state.values?.sides) ? state.values.sides : null;
  const confirm = !state.ok ? state.data?.confirmOutOfWindow : undefined;
  const failed = !state.ok && state.message && !confirm;
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="step-form">
      {failed ? (
        <Notice tone="danger" testId="step-refused">
          {state.message}
        </Notice>
      ) : null}
      {confirm ? (
        <Notice tone="caution" title="A reading is out of its window" testId="step-confirm">
          <p>{state.message}</p>
          <p className="mt-1 text-ink-soft">Correct the reading and record again, or record it as it is: the nonconformance then holds it until quality dispositions it.</p>
        </Notice>
      ) : null}
      <input type="hidden" name="pair" value={pair} />
      <input type="hidden" name="pairId" value={pairId} />
      <input type="hidden" name="seq" value={step.seq} />
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Done on</legend>
        <div className="flex flex-wrap gap-3">
          {sides.map((s) => (
            <label key={s.side} className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border border-line bg-surface px-3 has-checked:border-leaf has-checked:bg-leaf-soft">
              <input type="checkbox" name="sides" value={s.side} defaultChecked={s.ready && (!keptSides || keptSides.includes(s.side))} disabled={!s.ready} className="size-5 accent-leaf" />
              <span>
                {sides.length === 1 ? memberLabel : s.side === "L" ? "Left" : "Right"} <span className="serial text-sm">{s.identity}</span>
                {s.ready ? "" : ` (${s.note ?? "not at this step"})`}
              </span>
            </label>
          ))}
        </div>
        {state.fieldErrors?.sides ? <p className="text-sm text-danger">{state.fieldErrors.sides[0]}</p> : null}
      </fieldset>
      <div className="grid gap-4 sm:grid-cols-3">
        {step.readings.map((r) =>
          r.kind === "check" ? (
            <SelectField
              key={r.key}
              label={r.label}
              name={`reading.${r.key}`}
              defaultValue={v(`reading.${r.key}`)}
              options={[
                { value: "", label: "Choose…" },
                { value: "pass", label: "Passed" },
                { value: "fail", label: "Not passed" },
              ]}
              errors={state.fieldErrors?.[r.key]}
            />
          ) : r.kind === "text" ? (
            <TextField
              key={r.key}
              label={r.label}
              name={`reading.${r.key}`}
              autoComplete="off"
              spellCheck={false}
              defaultValue={v(`reading.${r.key}`)}
              hint="As printed on the tin or drum."
              errors={state.fieldErrors?.[r.key]}
            />
          ) : r.kind === "grit" ? (
            <TextField
              key={r.key}
              label={r.label}
              name={`reading.${r.key}`}
              autoComplete="off"
              placeholder="P240"
              defaultValue={v(`reading.${r.key}`)}
              hint={window[r.key] ? `P-grade on the back of the paper; window: ${window[r.key]}` : "P-grade on the back of the paper."}
              errors={state.fieldErrors?.[r.key]}
            />
          ) : (
            <TextField
              key={r.key}
              label={`${r.label}${r.unit ? ` (${r.unit})` : ""}`}
              name={`reading.${r.key}`}
              inputMode="decimal"
              defaultValue={v(`reading.${r.key}`) || (r.equals !== undefined ? String(r.equals) : "")}
              hint={window[r.key] ? `Window: ${window[r.key]}` : undefined}
              errors={state.fieldErrors?.[r.key]}
            />
          ),
        )}
        <TextField label="Started, minutes ago" name="startedMinutesAgo" type="number" min={0} max={1440} defaultValue={v("startedMinutesAgo") || "0"} hint="0 when it starts now; e.g. when the clamp went on." errors={state.fieldErrors?.startedMinutesAgo} />
      </div>
      <div className="flex flex-wrap gap-3">
        {/* The plain button comes first, so Enter in a field never answers the question. */}
        <SubmitButton pendingLabel="Recording…">Record {step.name.toLowerCase()}</SubmitButton>
        {confirm ? (
          <SubmitButton pendingLabel="Recording…" variant="danger" name="confirmOutOfWindow" value={confirm}>
            Record it and open a nonconformance
          </SubmitButton>
        ) : null}
      </div>
    </form>
  );
}
