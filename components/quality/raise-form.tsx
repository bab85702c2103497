"use client";
import { startTransition, useState, type FormEvent } from "react";
import { ChoiceField, SelectField, TextAreaField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { useActionStateThen } from "@/components/ui/kept-form";
import { initialFormState, type FormState } from "@/lib/form-state";
import { AFFECTED_GROUPS, CONTAINMENT_SEVERITIES, GROUP_LABEL, SEVERITY_WORDS, type ContainmentSeverity } from "@/lib/vocabulary/containments";

type Action = (state: FormState, formData: FormData) => Promise<FormState>;

/**
 * Quality's raise form: a lot, batch, flitch or serial, or a station of the route and two days;
 * the reason and the severity. "Preview" counts what it would reach and writes nothing; "Raise"
 * writes the containment and opens its page. Every field is held in state, so a refusal keeps them.
 */
export function RaiseForm({ preview, raise, stations, today }: { preview: Action; raise: Action; stations: { value: string; label: string }[]; today: string }) {
  const [by, setBy] = useState<"item" | "window">("item");
  const [target, setTarget] = useState("");
  const [station, setStation] = useState("");
  const [from, setFrom] = useState("");
  const [to, setTo] = useState(today);
  const [reason, setReason] = useState("");
  const [severity, setSeverity] = useState<ContainmentSeverity | "">("");
  const [shown, setShown] = useState<"preview" | "raise" | null>(null);
  const [previewed, previewAction, previewing] = useActionStateThen(preview, initialFormState, () => {});
  const [raised, raiseAction, raising] = useActionStateThen(raise, initialFormState, () => {});
  const state = shown === "preview" ? previewed : shown === "raise" ? raised : initialFormState;
  const errors = (f: string) => (!state.ok ? state.fieldErrors?.[f] : undefined);
  const pending = previewing || raising;

  const submit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    if (pending) return;
    const which = (e.nativeEvent as SubmitEvent).submitter?.getAttribute("value") === "preview" ? "preview" : "raise";
    const formData = new FormData(e.currentTarget);
    setShown(which);
    startTransition(() => (which === "preview" ? previewAction : raiseAction)(formData));
  };
  const counts = shown === "preview" && previewed.ok ? previewed.data : undefined;

  return (
    <form onSubmit={submit} className="flex flex-col gap-5" data-testid="raise-form" noValidate>
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="raise-refused">
          {state.message} Nothing was written.
        </Notice>
      ) : null}
      <ChoiceField
        legend="What is suspect"
        name="by"
        value={by}
        onChange={(v) => setBy(v as "item" | "window")}
        options={[
          { value: "item", label: "A lot, batch, flitch or serial" },
          { value: "window", label: "Everything through a station between two dates" },
        ]}
        errors={errors("by")}
      />
      {by === "item" ? (
        <TextField
          label="Lot, batch, flitch or serial"
          name="target"
          value={target}
          onChange={(e) => setTarget(e.currentTarget.value)}
          errors={errors("target")}
          hint="A component lot, a drive-unit batch, the maker's lot or serial, a flitch, or one unit, board, cabinet, speaker or pair. Case, spaces and missing hyphens do not matter."
          autoComplete="off"
        />
      ) : (
        <div className="grid gap-4 sm:grid-cols-3">
          <SelectField label="Station" name="station" value={station} onChange={(e) => setStation(e.currentTarget.value)} options={[{ value: "", label: "Choose…" }, ...stations]} errors={errors("station")} />
          <TextField label="From (first day)" type="date" name="from" value={from} max={today} onChange={(e) => setFrom(e.currentTarget.value)} errors={errors("from")} />
          <TextField label="To (last day)" type="date" name="to" value={to} max={today} onChange={(e) => setTo(e.currentTarget.value)} errors={errors("to")} />
        </div>
      )}
      <TextAreaField label="Why it is suspect" name="reason" rows={3} value={reason} onChange={(e) => setReason(e.currentTarget.value)} errors={errors("reason")} maxLength={2000} hint="What the supplier reported, or what was found." />
      <ChoiceField legend="Severity" name="severity" value={severity} onChange={(v) => setSeverity(v as ContainmentSeverity)} options={CONTAINMENT_SEVERITIES.map((s) => ({ value: s, label: SEVERITY_WORDS[s] }))} errors={errors("severity")} />
      {counts ? (
        <Notice tone="info" testId="raise-preview" title={`${counts.target} reaches ${counts.total} serial${counts.total === "1" ? "" : "s"} today`}>
          <ul className="flex flex-wrap gap-x-6 gap-y-1">
            {AFFECTED_GROUPS.map((g) => (
              <li key={g}>
                {GROUP_LABEL[g]}: <span className="font-bold">{counts[g]}</span>
              </li>
            ))}
          </ul>
          <p className="mt-1 text-sm">Nothing is written until you raise it.</p>
        </Notice>
      ) : null}
      <div className="flex flex-wrap gap-3">
        <Button type="submit" name="intent" value="preview" variant="secondary" disabled={pending}>
          {previewing ? "Counting…" : "Preview what it reaches"}
        </Button>
        <Button type="submit" name="intent" value="raise" variant="primary" disabled={pending}>
          {raising ? "Raising…" : "Raise the containment"}
        </Button>
      </div>
    </form>
  );
}
