"use client";
import { useActionState, useState } from "react";
import { useActionStateThen } from "@/components/ui/kept-form";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { useToast } from "@/components/ui/toast";
import { initialFormState } from "@/lib/form-state";
import { clearDefectAction, measureLeafAction, noteDefectAction } from "../../actions/leaves";

export interface LeafRowData {
  id: string;
  seq: number;
  lengthMm: number | null;
  widthMm: number | null;
  usable: boolean;
  state: string;
  defects: { id: number; kind: string; note: string; positionMm: number | null }[];
  /** "left face of P-…", "reserve for P-…" and the like; null when free. */
  status: string | null;
  /** Laid on a cabinet: its record stays as it was. */
  locked: boolean;
  short: boolean;
}

const input = "h-11 w-24 rounded-md border border-line-strong bg-surface px-2 text-right tabular-nums disabled:bg-paper disabled:text-ink-soft";

function DefectDialog({ flitch, leaf, kinds }: { flitch: string; leaf: LeafRowData; kinds: readonly string[] }) {
  const [open, setOpen] = useState(false);
  const toast = useToast();
  const [state, action] = useActionStateThen(noteDefectAction, initialFormState, (s) => {
    if (s.message) toast(s.message);
    setOpen(false);
  });
  return (
    <Dialog open={open} onOpenChange={setOpen} trigger="Defect…" triggerLabel={`Note a defect on leaf ${leaf.seq}`} title={`Defect on leaf ${leaf.seq}`} description="Where along the leaf is measured from its butt end.">
      <form action={action} className="flex flex-col gap-4" noValidate data-testid="defect-form">
        {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
        <input type="hidden" name="flitch" value={flitch} />
        <input type="hidden" name="leafId" value={leaf.id} />
        <SelectField label="Kind" name="kind" options={[{ value: "", label: "Choose…" }, ...kinds.map((k) => ({ value: k, label: k }))]} errors={state.fieldErrors?.kind} required />
        <TextField label="Note" name="note" errors={state.fieldErrors?.note} />
        <TextField label="Position along the leaf (mm)" name="positionMm" inputMode="decimal" errors={state.fieldErrors?.positionMm} hint="Leave empty if it runs the whole leaf." />
        <label className="flex min-h-12 items-center gap-3">
          <input type="checkbox" name="stillUsable" className="size-5 accent-leaf" />
          <span>Still fit to face a cabinet (a small defect that trims off)</span>
        </label>
        <SubmitButton pendingLabel="Saving…">Note defect</SubmitButton>
      </form>
    </Dialog>
  );
}

function ClearDefect({ flitch, defect }: { flitch: string; defect: LeafRowData["defects"][number] }) {
  const [state, action] = useActionState(clearDefectAction, initialFormState);
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return (
      <button type="button" className="ml-1 text-sm text-leaf-dark underline" onClick={() => setAsking(true)}>
        clear
      </button>
    );
  }
  return (
    <form action={action} className="mt-1 flex items-center gap-1">
      <input type="hidden" name="flitch" value={flitch} />
      <input type="hidden" name="defectId" value={defect.id} />
      <input name="reason" aria-label="Why is the defect cleared?" placeholder="Why?" className="h-9 w-36 rounded-md border border-line-strong px-2 text-sm" />
      <SubmitButton pendingLabel="…" className="h-9 min-h-0 px-2 text-sm">
        Clear
      </SubmitButton>
      {!state.ok && state.message ? <span className="text-sm text-danger">{state.fieldErrors?.reason?.[0] ?? state.message}</span> : null}
    </form>
  );
}

function LeafRow({ flitch, leaf, kinds }: { flitch: string; leaf: LeafRowData; kinds: readonly string[] }) {
  const [state, action, pending] = useActionState(measureLeafAction, initialFormState);
  const formId = `leaf-${leaf.seq}`;
  const err = state.ok ? null : state.fieldErrors ? Object.values(state.fieldErrors).flat().filter(Boolean).join(" ") || state.message : state.message;
  return (
    <tr className="border-b border-line align-middle" data-testid={`leaf-row-${leaf.seq}`}>
      <td className="px-2 py-2 font-bold tabular-nums">{leaf.seq}</td>
      <td className="px-2 py-2">
        <form id={formId} action={action} />
        <input type="hidden" form={formId} name="flitch" value={flitch} />
        <input type="hidden" form={formId} name="leafId" value={leaf.id} />
        <input form={formId} name="lengthMm" aria-label={`Length of leaf ${leaf.seq}, mm`} inputMode="decimal" defaultValue={leaf.lengthMm ?? ""} disabled={leaf.locked} className={input} />
      </td>
      <td className="px-2 py-2">
        <input form={formId} name="widthMm" aria-label={`Width of leaf ${leaf.seq}, mm`} inputMode="decimal" defaultValue={leaf.widthMm ?? ""} disabled={leaf.locked} className={input} />
      </td>
      <td className="px-2 py-2 text-center">
        <input form={formId} type="checkbox" name="usable" aria-label={`Leaf ${leaf.seq} usable`} defaultChecked={leaf.usable} disabled={leaf.locked} className="size-5 accent-leaf" />
      </td>
      <td className="px-2 py-2 text-sm">
        {leaf.defects.length === 0 ? <span className="text-ink-soft">none</span> : null}
        <ul>
          {leaf.defects.map((d) => (
            <li key={d.id}>
              <span className="font-bold">{d.kind}</span>
              {d.positionMm !== null ? ` at ${d.positionMm} mm` : ""}
              {d.note ? `: ${d.note}` : ""}
              {leaf.locked ? null : <ClearDefect flitch={flitch} defect={d} />}
            </li>
          ))}
        </ul>
      </td>
      <td className="px-2 py-2 text-sm">
        {leaf.status ?? (leaf.lengthMm === null || leaf.widthMm === null ? <span className="text-caution">not measured</span> : leaf.short ? <span className="text-caution">short for this model</span> : leaf.usable ? "free" : <span className="text-danger">unusable</span>)}
      </td>
      <td className="px-2 py-2">
        {leaf.locked ? null : (
          <div className="flex flex-wrap items-center gap-2">
            <Button type="submit" form={formId} variant="secondary" size="sm" className="min-h-11" disabled={pending} aria-busy={pending} aria-label={`Save leaf ${leaf.seq}`}>
              {pending ? "Saving…" : "Save"}
            </Button>
            <DefectDialog flitch={flitch} leaf={leaf} kinds={kinds} />
          </div>
        )}
        {state.ok && state.message ? (
          <p className="text-sm text-leaf-dark" role="status">
            {state.message}
          </p>
        ) : null}
        {err ? (
          <p className="text-sm text-danger" role="alert">
            {err}
          </p>
        ) : null}
      </td>
    </tr>
  );
}

/** The leaves in slicing order, each editable where it stands; one save per row. */
export function LeafTable({ flitch, leaves, kinds }: { flitch: string; leaves: LeafRowData[]; kinds: readonly string[] }) {
  return (
    <div className="relative overflow-x-auto">
      <table className="w-full border-collapse text-left" data-testid="leaf-table">
        <caption className="sr-only">Leaves of {flitch} in slicing order</caption>
        <thead>
          <tr className="border-b-2 border-line-strong text-sm">
            <th scope="col" className="px-2 py-2">Leaf</th>
            <th scope="col" className="px-2 py-2">Length, mm</th>
            <th scope="col" className="px-2 py-2">Width, mm</th>
            <th scope="col" className="px-2 py-2">Usable</th>
            <th scope="col" className="px-2 py-2">Defects</th>
            <th scope="col" className="px-2 py-2">Status</th>
            <th scope="col" className="px-2 py-2"><span className="sr-only">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          {leaves.map((l) => (
            <LeafRow key={l.id} flitch={flitch} leaf={l} kinds={kinds} />
          ))}
        </tbody>
      </table>
    </div>
  );
}
