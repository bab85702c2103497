"use client";
import { useActionState, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { correctOwnReadingAction, correctReadingAction } from "../../actions/corrections";

export interface CorrectableRecord {
  id: number;
  /** How long before it was recorded the step started, in whole minutes. */
  startedMinutesBefore: number;
  /** "Step 6, Lacquer coat 1, stoved · recorded 09:12 on 8 Dec". */
  label: string;
  readings: { key: string; label: string; kind: "number" | "check" | "text" | "grit"; unit: string | null; window: string; current: string }[];
}

/**
 * Correcting a mistyped reading: choose the record, type the values as they should have read and
 * say why. The record stays as written; the correction is added beside it. A value now outside its
 * window is asked about first, as when a step is recorded.
 */
export function CorrectionForm({ pair, pairId, records, asQuality }: { pair: string; pairId: string; records: CorrectableRecord[]; asQuality: boolean }) {
  const [state, action] = useActionState(asQuality ? correctReadingAction : correctOwnReadingAction, initialFormState);
  const kept = typeof state.values?.recordId === "string" ? Number(state.values.recordId) : null;
  const [chosen, setChosen] = useState<number | null>(kept ?? records[0]?.id ?? null);
  const record = records.find((r) => r.id === chosen) ?? null;
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : undefined);
  const confirm = !state.ok ? state.data?.confirmOutOfWindow : undefined;
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="correction-form">
      {!state.ok && state.message && !confirm ? (
        <Notice tone="danger" testId="correction-refused">
          {state.message}
        </Notice>
      ) : null}
      {confirm ? (
        <Notice tone="caution" title="The corrected value is out of its window" testId="correction-confirm">
          <p>{state.message}</p>
        </Notice>
      ) : null}
      <input type="hidden" name="pair" value={pair} />
      <input type="hidden" name="pairId" value={pairId} />
      <SelectField
        label="Recorded step"
        name="recordId"
        value={chosen === null ? "" : String(chosen)}
        onChange={(e) => setChosen(Number(e.target.value) || null)}
        options={records.map((r) => ({ value: String(r.id), label: r.label }))}
        errors={state.fieldErrors?.recordId}
      />
      {record ? (
        <div className="grid gap-4 sm:grid-cols-3" key={record.id}>
          {record.readings.map((r) =>
            r.kind === "check" ? (
              <SelectField
                key={r.key}
                label={`${r.label} (now: ${r.current})`}
                name={`reading.${r.key}`}
                defaultValue={v(`reading.${r.key}`) ?? (r.current === "passed" ? "pass" : "fail")}
                options={[
                  { value: "pass", label: "Passed" },
                  { value: "fail", label: "Not passed" },
                ]}
                errors={state.fieldErrors?.[r.key]}
              />
            ) : (
              <TextField
                key={r.key}
                label={`${r.label}${r.unit ? ` (${r.unit})` : ""}`}
                name={`reading.${r.key}`}
                autoComplete="off"
                inputMode={r.kind === "number" ? "decimal" : undefined}
                placeholder={r.current}
                defaultValue={v(`reading.${r.key}`) ?? ""}
                hint={`Now: ${r.current}${r.kind === "text" ? "" : `; window: ${r.window}`}. Leave empty to keep it.`}
                errors={state.fieldErrors?.[r.key]}
              />
            ),
          )}
        </div>
      ) : null}
      {record ? (
        <TextField
          key={`start-${record.id}`}
          label="Started, minutes before it was recorded"
          name="startedMinutesBefore"
          type="number"
          min={0}
          max={1440}
          placeholder={String(record.startedMinutesBefore)}
          defaultValue={v("startedMinutesBefore") ?? ""}
          hint={`Now: ${record.startedMinutesBefore} min. Leave empty to keep it; a hold after the step counts from the corrected start.`}
          errors={state.fieldErrors?.startedMinutesBefore ?? state.fieldErrors?.startedAt}
        />
      ) : null}
      <TextField label="Why it is corrected" name="reason" defaultValue={v("reason") ?? ""} hint="E.g. “typed 1000 for 100 µm”. Kept with the correction." errors={state.fieldErrors?.reason ?? state.fieldErrors?.readings} />
      <div className="flex flex-wrap gap-3">
        <SubmitButton pendingLabel="Correcting…" variant="secondary">
          Correct the reading
        </SubmitButton>
        {confirm ? (
          <SubmitButton pendingLabel="Correcting…" variant="danger" name="confirmOutOfWindow" value={confirm}>
            Correct it and open a nonconformance
          </SubmitButton>
        ) : null}
      </div>
    </form>
  );
}
