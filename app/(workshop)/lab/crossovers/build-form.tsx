"use client";
import { useId, useRef, useState } from "react";
import { useActionStateThen } from "@/components/ui/kept-form";
import { Button } from "@/components/ui/button";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { readPartValues, TOLERANCE_LETTERS, type Unit } from "@/lib/crossover-parts";
import { initialFormState } from "@/lib/form-state";
import { buildCrossoverAction } from "./actions";
import { MAX_ROWS } from "./limits";
import type { PartRow } from "./schemas";

type Row = PartRow & { key: number };

/** A row as the server takes it: without the key that only tells rows apart on screen. */
function partOf(row: Row): PartRow {
  const { key, ...part } = row;
  void key;
  return part;
}

export interface LotOption {
  identity: string;
  partNumber: string;
  nominal: string;
  tolerance: string;
  value: string;
}

const TOLERANCES = [
  { value: "", label: "Tolerance…" },
  ...Object.entries(TOLERANCE_LETTERS).map(([letter, f]) => ({ value: letter, label: `${letter} ±${Number((f * 100).toPrecision(6))} %` })),
];
const UNIT_OF_LETTER: Record<string, Unit> = { C: "F", L: "H", R: "Ω" };
const unitOf = (position: string) => UNIT_OF_LETTER[position.trim().toUpperCase().charAt(0)];
/** Examples in the fields, of the quantity the position's letter asks for. */
const EXAMPLE: Record<Unit, { lot: string; nominal: string; reading: string }> = {
  F: { lot: "LOT-CAP-2502-A", nominal: "4.7µF", reading: "4.68µF" },
  H: { lot: "LOT-IND-2502-A", nominal: "0.82mH", reading: "0.81mH" },
  Ω: { lot: "LOT-RES-2502-A", nominal: "8.2Ω", reading: "8.19Ω" },
};

let nextKey = 1;
const emptyRow = (position = ""): Row => ({ key: nextKey++, position, lot: "", partNumber: "", nominal: "", tolerance: "J", reading: "" });
const START: string[] = ["C1", "C2", "L1", "L2", "R1"];

type Hint = { ok: boolean; text: string } | null;

/** Reads a row's nominal and reading as the server will (the same function), to show under each field what it will be taken as. */
function preview(row: PartRow): { nominal: Hint; reading: Hint } {
  const read = readPartValues({ nominal: row.nominal, reading: row.reading, unit: unitOf(row.position) });
  const hint = (r: typeof read.nominal | typeof read.reading): Hint => (r === null ? null : r.ok ? { ok: true, text: `= ${r.display}` } : { ok: false, text: r.message });
  return { nominal: hint(read.nominal), reading: hint(read.reading) };
}

/**
 * Build a board: one row per part. Rows are kept in state and sent as JSON in the hidden `parts`
 * field; the server answers each row's problems under `parts.<index>` of the rows it was sent,
 * so the keys of the rows as submitted are remembered to put each error on its row.
 */
export function BuildForm({ models, lots }: { models: { id: string; code: string; name: string }[]; lots: LotOption[] }) {
  const [rows, setRows] = useState<Row[]>(() => START.map((p) => emptyRow(p)));
  const [modelId, setModelId] = useState(models[0]?.id ?? "");
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);
  const [submitted, setSubmitted] = useState<number[]>([]);
  // After a board is saved: keep the rows for its twin (same parts, same lots), clear what was measured.
  const [state, action] = useActionStateThen(buildCrossoverAction, initialFormState, () => {
    setRows((list) => list.map((r) => ({ ...r, reading: "" })));
    setFile(null);
    if (fileInput.current) fileInput.current.value = "";
  });
  const id = useId();
  const lotsId = `${id}-lots`;

  const errorsFor = (key: number) => {
    if (state.ok) return undefined;
    const i = submitted.indexOf(key);
    return i === -1 ? undefined : state.fieldErrors?.[`parts.${i}`];
  };
  const update = (key: number, patch: Partial<PartRow>) => setRows((list) => list.map((r) => (r.key === key ? { ...r, ...patch } : r)));
  const chooseLot = (key: number, code: string) => {
    const lot = lots.find((l) => l.identity === code.trim().toUpperCase());
    setRows((list) =>
      list.map((r) =>
        r.key !== key
          ? r
          : { ...r, lot: code, partNumber: r.partNumber || lot?.partNumber || "", nominal: r.nominal || lot?.nominal || "", tolerance: lot?.tolerance && !r.partNumber ? lot.tolerance : r.tolerance },
      ),
    );
  };
  const summary = !state.ok ? state.fieldErrors?.parts : undefined;

  return (
    <form
      action={action}
      onSubmit={() => {
        setSubmitted(rows.map((r) => r.key));
      }}
      className="flex flex-col gap-4"
      noValidate
      data-testid="build-form"
    >
      {state.message ? (
        <Notice tone={state.ok ? (state.data?.verdict === "fail" ? "caution" : "leaf") : "danger"} testId={state.ok ? (state.data?.verdict === "fail" ? "board-failed" : "board-built") : "build-refused"}>
          <p>{state.message}</p>
          {summary?.length ? (
            <ul className="mt-1 list-disc pl-5">
              {summary.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}

      <input type="hidden" name="parts" value={JSON.stringify(rows.map((r) => partOf(r)))} />
      <input type="hidden" name="responseName" value={file?.name ?? ""} />
      <input type="hidden" name="responseText" value={file?.text ?? ""} />

      <div className="grid gap-4 sm:grid-cols-2">
        <label className="flex flex-col gap-1.5">
          <span className="font-bold">Model</span>
          <select
            name="modelId"
            value={modelId}
            onChange={(e) => setModelId(e.currentTarget.value)}
            className={controlClasses}
            aria-invalid={state.fieldErrors?.modelId?.length ? true : undefined}
            aria-describedby={state.fieldErrors?.modelId?.length ? `${id}-model-error` : undefined}
          >
            {models.map((m) => (
              <option key={m.id} value={m.id}>
                {m.code} {m.name}
              </option>
            ))}
          </select>
          {!state.ok && state.fieldErrors?.modelId?.length ? (
            <span id={`${id}-model-error`} className="text-sm font-bold text-danger">
              {state.fieldErrors.modelId.join(" ")}
            </span>
          ) : null}
        </label>
        <label className="flex flex-col gap-1.5">
          <span className="font-bold">Response file (optional)</span>
          <input
            ref={fileInput}
            type="file"
            accept=".txt,.frd,.csv,.dat,text/plain"
            data-testid="response-file"
            className={`${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`}
            aria-describedby={`${id}-response-hint`}
            onChange={async (e) => {
              const f = e.currentTarget.files?.[0];
              setFile(f ? { name: f.name, text: await f.text() } : null);
            }}
          />
          <span id={`${id}-response-hint`} className="text-sm text-ink-soft">
            {file ? `${file.name}: ${file.text.split(/\r?\n/).length} lines read.` : "The board's measured response: Hz and dB per line. Needed to pair it."}
          </span>
          {!state.ok && state.fieldErrors?.response?.length ? (
            <ul className="list-disc pl-5 text-sm font-bold text-danger" data-testid="response-errors">
              {state.fieldErrors.response.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          ) : null}
        </label>
      </div>

      <datalist id={lotsId}>
        {lots.map((l) => (
          <option key={l.identity} value={l.identity}>
            {l.value || l.partNumber}
          </option>
        ))}
      </datalist>

      <fieldset className="flex flex-col gap-3">
        <legend className="mb-1 font-bold">Parts, one row per position</legend>
        <p className="text-sm text-ink-soft">
          Position as printed on the board (C for capacitors, L for inductors, R for resistors). Write values as the lab does: 4.7µF or 4u7, 0.82 mH, 8.2 Ω or 8R2. A number alone is read in µF, mH or Ω for a nominal, and in the nominal&apos;s unit for a reading (4.72 against 4.7 µF is 4.72 µF); what each value is taken as shows under its field. Nominals must be E24 values. A lot code not yet registered is registered with this row&apos;s part.
        </p>
        <ol className="flex flex-col gap-3">
          {rows.map((r, i) => {
            const errors = errorsFor(r.key);
            const { nominal: n, reading: m } = preview(r);
            const rowId = `${id}-row-${r.key}`;
            const example = EXAMPLE[unitOf(r.position) ?? "F"];
            const cell = (field: keyof PartRow, label: string, extra: Record<string, unknown> = {}, hint?: Hint) => (
              <label className="flex min-w-0 flex-col gap-1">
                <span className="text-sm font-bold">{label}</span>
                <input
                  value={r[field]}
                  onChange={(e) => update(r.key, { [field]: e.currentTarget.value })}
                  className={controlClasses}
                  aria-invalid={errors?.length ? true : undefined}
                  aria-describedby={[hint ? `${rowId}-${field}-hint` : "", errors?.length ? `${rowId}-errors` : ""].filter(Boolean).join(" ") || undefined}
                  data-field={field}
                  autoComplete="off"
                  {...extra}
                />
                {hint ? (
                  <span id={`${rowId}-${field}-hint`} className={`text-xs ${hint.ok ? "text-ink-soft" : "text-caution"}`} data-testid={`${field}-preview`}>
                    {hint.text}
                  </span>
                ) : null}
              </label>
            );
            return (
              <li key={r.key} className={`rounded-lg border p-3 ${errors?.length ? "border-danger bg-danger-soft/30" : "border-line bg-paper"}`} data-testid="part-row" aria-label={`Part ${i + 1}`}>
                <div className="grid grid-cols-2 items-start gap-3 md:grid-cols-[5rem_minmax(0,1.4fr)_minmax(0,1.2fr)_minmax(0,1fr)_8.5rem_minmax(0,1fr)_auto]">
                  {cell("position", "Position", { placeholder: "C1", spellCheck: false })}
                  <label className="flex min-w-0 flex-col gap-1">
                    <span className="text-sm font-bold">Lot code</span>
                    <input
                      value={r.lot}
                      list={lotsId}
                      onChange={(e) => chooseLot(r.key, e.currentTarget.value)}
                      className={controlClasses}
                      placeholder={example.lot}
                      spellCheck={false}
                      autoComplete="off"
                      data-field="lot"
                      aria-invalid={errors?.length ? true : undefined}
                      aria-describedby={errors?.length ? `${rowId}-errors` : undefined}
                    />
                  </label>
                  {cell("partNumber", "Part number")}
                  {cell("nominal", "Nominal", { placeholder: example.nominal }, n)}
                  <label className="flex min-w-0 flex-col gap-1">
                    <span className="text-sm font-bold">Tolerance</span>
                    <select
                      value={r.tolerance}
                      onChange={(e) => update(r.key, { tolerance: e.currentTarget.value })}
                      className={controlClasses}
                      data-field="tolerance"
                      aria-invalid={errors?.length ? true : undefined}
                      aria-describedby={errors?.length ? `${rowId}-errors` : undefined}
                    >
                      {TOLERANCES.map((t) => (
                        <option key={t.value} value={t.value}>
                          {t.label}
                        </option>
                      ))}
                    </select>
                  </label>
                  {cell("reading", "Reading", { placeholder: example.reading }, m)}
                  <div className="flex flex-col gap-1">
                    <span className="text-sm font-bold" aria-hidden="true">
                      &nbsp;
                    </span>
                    <Button variant="quiet" size="sm" onClick={() => setRows((list) => list.filter((x) => x.key !== r.key))} disabled={rows.length === 1} aria-label={`Remove part ${i + 1}${r.position ? ` (${r.position})` : ""}`}>
                      Remove
                    </Button>
                  </div>
                </div>
                {errors?.length ? (
                  <ul id={`${rowId}-errors`} className="mt-2 list-disc pl-5 text-sm font-bold text-danger" data-testid="row-errors">
                    {errors.map((e) => (
                      <li key={e}>{e}</li>
                    ))}
                  </ul>
                ) : null}
              </li>
            );
          })}
        </ol>
        <div>
          <Button variant="secondary" size="sm" onClick={() => setRows((list) => [...list, emptyRow()])} disabled={rows.length >= MAX_ROWS} data-testid="add-row">
            Add a part
          </Button>
        </div>
      </fieldset>
      <p className="text-sm text-ink-soft">
        Every part needs its reading; a part outside its tolerance, or without a reading, records the board as failed with the reason. A value that is not an E24 value, a reading more than ten times away from its nominal, an unknown lot or any other slip saves nothing.
      </p>
      <div>
        <SubmitButton pendingLabel="Checking the board…">Build and check the board</SubmitButton>
      </div>
    </form>
  );
}
