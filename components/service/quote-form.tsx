"use client";
import { useState } from "react";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState, type FormState } from "@/lib/form-state";

interface Row {
  kind: "part" | "labour";
  description: string;
  quantity: string;
  unitPrice: string;
}

const empty = (kind: Row["kind"]): Row => ({ kind, description: "", quantity: "1", unitPrice: "" });

/**
 * A quote's lines: part or labour, what, how many, the price of one in the workshop's currency.
 * The rows are controlled, so what was typed stays after a refusal; errors sit under their cell.
 */
export function QuoteForm({
  code,
  currency,
  example,
  rows: count,
  action,
}: {
  code: string;
  currency: string;
  example: string;
  rows: number;
  action: (state: FormState, formData: FormData) => Promise<FormState>;
}) {
  const fresh = () => Array.from({ length: count }, (_, i) => empty(i === count - 1 ? "labour" : "part"));
  const [rows, setRows] = useState<Row[]>(fresh);
  const [state, run, pending] = useActionStateThen(action, initialFormState, () => setRows(fresh()));
  const submit = submitKeepingFields(run, pending);
  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  const set = (i: number, patch: Partial<Row>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  return (
    <form onSubmit={submit} aria-busy={pending} className="flex flex-col gap-4" noValidate data-testid="quote-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "quoted" : "quote-refused"}>
          {state.message}
          {errors("lines")?.length ? ` ${errors("lines")!.join(" ")}` : ""}
        </Notice>
      ) : null}
      <input type="hidden" name="code" value={code} />
      {rows.map((r, i) => (
        <fieldset key={i} className="grid gap-3 border-t border-line pt-3 sm:grid-cols-[8rem_1fr_6rem_9rem]" data-testid={`quote-line-${i}`}>
          <legend className="sr-only">Line {i + 1}</legend>
          <SelectField
            label="Kind"
            name="kind"
            value={r.kind}
            onChange={(e) => set(i, { kind: e.currentTarget.value as Row["kind"] })}
            options={[
              { value: "part", label: "Part" },
              { value: "labour", label: "Labour" },
            ]}
          />
          <TextField label="What" name="description" value={r.description} onChange={(e) => set(i, { description: e.currentTarget.value })} errors={errors(`lines.${i}.description`)} autoComplete="off" />
          <TextField label="How many" name="quantity" inputMode="numeric" value={r.quantity} onChange={(e) => set(i, { quantity: e.currentTarget.value })} errors={errors(`lines.${i}.quantity`)} />
          <TextField
            label={`Price of one (${currency})`}
            name="unitPrice"
            inputMode="decimal"
            placeholder={example}
            value={r.unitPrice}
            onChange={(e) => set(i, { unitPrice: e.currentTarget.value })}
            errors={errors(`lines.${i}.unitPrice`)}
            autoComplete="off"
          />
        </fieldset>
      ))}
      <p className="text-sm text-ink-soft">Leave a line empty to leave it out. A new quote replaces the last one.</p>
      <div>
        <Button type="submit" disabled={pending} aria-busy={pending}>
          {pending ? "Saving…" : "Save the quote"}
        </Button>
      </div>
    </form>
  );
}
