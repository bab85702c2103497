"use client";
import { useActionState } from "react";
import { DataTable } from "@/components/ui/data-table";
import { SelectField, TextAreaField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState, type FormState } from "@/lib/form-state";

type Action = (prev: FormState | undefined, formData: FormData) => Promise<FormState>;

/** The case and the place every form of the page acts on. */
export interface Place {
  code: string;
  side: string;
  position: string;
}

function Hidden({ place, weights }: { place: Place; weights?: { fs: number; qts: number } }) {
  return (
    <>
      <input type="hidden" name="code" value={place.code} />
      <input type="hidden" name="side" value={place.side} />
      <input type="hidden" name="position" value={place.position} />
      {weights ? (
        <>
          <input type="hidden" name="fsWeight" value={weights.fs} />
          <input type="hidden" name="qtsWeight" value={weights.qts} />
        </>
      ) : null}
    </>
  );
}

function Outcome({ state, testId }: { state: FormState; testId: string }) {
  if (!state.message) return null;
  return (
    <Notice tone={state.ok ? "info" : "danger"} testId={testId}>
      {state.message}
    </Notice>
  );
}

export interface CandidateRow {
  serial: string;
  /** dB, as the lab's matching computes it. */
  cost: number;
  costText: string;
  maxDiffDb: number;
  maxDiffText: string;
  /** "at 2.5 kHz". */
  band: string;
}

/** The ranked candidates, sortable, each with a button that reserves it; the order given is best first. */
export function ReplaceCandidates({ place, weights, rows, action, canReserve }: { place: Place; weights: { fs: number; qts: number }; rows: CandidateRow[]; action: Action; canReserve: boolean }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <form action={act} className="flex flex-col gap-3" data-testid="candidates-form">
      <Hidden place={place} weights={weights} />
      <Outcome state={state} testId="candidates-outcome" />
      <DataTable
        testId="candidates"
        caption="Stock parts within the limit of the survivor, best first"
        initialSort={{ key: "rank", dir: "asc" }}
        empty="No part in stock is within the limit."
        columns={[
          { key: "rank", label: "Rank", numeric: true },
          { key: "serial", label: "Serial" },
          { key: "cost", label: "Mismatch (RMS)", numeric: true },
          { key: "diff", label: "Largest band difference", numeric: true },
          { key: "reserve", label: "", sortable: false },
        ]}
        rows={rows.map((r, i) => ({
          id: r.serial,
          cells: {
            rank: { value: i + 1 },
            serial: { value: r.serial, display: <span className="font-mono">{r.serial}</span> },
            cost: { value: r.cost, display: r.costText },
            diff: { value: r.maxDiffDb, display: `${r.maxDiffText} ${r.band}` },
            reserve: {
              value: null,
              display: canReserve ? (
                <SubmitButton name="serial" value={r.serial} pendingLabel="Reserving…" variant="secondary" aria-label={`Reserve ${r.serial}`}>
                  Reserve
                </SubmitButton>
              ) : null,
            },
          },
        }))}
      />
    </form>
  );
}

/** A serial typed or scanned by hand: refused with the reason next to the field when it does not fit. */
export function ReserveBySerial({ place, weights, action }: { place: Place; weights: { fs: number; qts: number }; action: Action }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <form action={act} className="flex flex-col gap-3" data-testid="reserve-serial">
      <Hidden place={place} weights={weights} />
      <Outcome state={state} testId="reserve-serial-outcome" />
      <TextField label="Serial of a stock part" name="serial" autoComplete="off" defaultValue={typeof state.values?.serial === "string" && !state.ok ? state.values.serial : ""} hint="Scan its label or type it; hyphens and case do not matter." errors={state.fieldErrors?.serial} />
      <div>
        <SubmitButton pendingLabel="Checking…">Reserve this part</SubmitButton>
      </div>
    </form>
  );
}

export interface SetRow {
  left: string;
  right: string;
  costText: string;
  maxDiffText: string;
}

/** Matched pairs from stock for both speakers, when no single part fits the survivor. */
export function ReplaceSets({ place, weights, rows, action, canReserve }: { place: Place; weights: { fs: number; qts: number }; rows: SetRow[]; action: Action; canReserve: boolean }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <div className="flex flex-col gap-3" data-testid="sets">
      <Outcome state={state} testId="sets-outcome" />
      <ul className="flex flex-col gap-2">
        {rows.map((s) => (
          <li key={`${s.left}:${s.right}`} className="flex flex-wrap items-center gap-3 rounded-lg border border-line p-3">
            <span>
              Left <span className="font-mono">{s.left}</span>, right <span className="font-mono">{s.right}</span>: mismatch {s.costText}, largest band difference {s.maxDiffText}
            </span>
            {canReserve ? (
              <form action={act}>
                <Hidden place={place} weights={weights} />
                <input type="hidden" name="left" value={s.left} />
                <input type="hidden" name="right" value={s.right} />
                <SubmitButton variant="secondary" pendingLabel="Reserving…">
                  Reserve both
                </SubmitButton>
              </form>
            ) : null}
          </li>
        ))}
      </ul>
    </div>
  );
}

/** Gives a reserved part back to stock. */
export function ReleaseReservation({ place, serial, action }: { place: Place; serial: string; action: Action }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <form action={act} className="flex flex-col gap-2" data-testid={`release-${serial}`}>
      <Hidden place={place} />
      <input type="hidden" name="serial" value={serial} />
      <Outcome state={state} testId="release-outcome" />
      <div>
        <SubmitButton variant="quiet" pendingLabel="Releasing…">
          Release {serial}
        </SubmitButton>
      </div>
    </form>
  );
}

/** Takes the failed part out and fits the reserved one, with what becomes of the part taken out. */
export function FitReplacement({ place, reserved, current, dispositions, action }: { place: Place; reserved: string; current: string; dispositions: { value: string; label: string }[]; action: Action }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <form action={act} className="flex flex-col gap-3" data-testid="fit-form">
      <Hidden place={place} />
      <Outcome state={state} testId="fit-outcome" />
      <p>
        Take <span className="font-mono">{current}</span> out and fit <span className="font-mono">{reserved}</span> in its place.
      </p>
      <SelectField label="What becomes of the part taken out" name="disposition" options={[{ value: "", label: "Choose…" }, ...dispositions]} defaultValue="" errors={state.fieldErrors?.disposition} />
      <TextAreaField label="Why it comes out" name="reason" hint="What was found, in a few words." errors={state.fieldErrors?.reason} />
      <div>
        <SubmitButton pendingLabel="Recording…">Record the repair</SubmitButton>
      </div>
    </form>
  );
}

/** Moves the case to "repaired" once every finding has its repair. */
export function MarkRepaired({ place, action }: { place: Place; action: Action }) {
  const [state, act] = useActionState(action, initialFormState);
  return (
    <form action={act} className="flex flex-col gap-2" data-testid="mark-repaired">
      <Hidden place={place} />
      <Outcome state={state} testId="mark-repaired-outcome" />
      <div>
        <SubmitButton pendingLabel="Moving…">Mark the case repaired</SubmitButton>
      </div>
    </form>
  );
}
