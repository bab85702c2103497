"use client";
import { useActionState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { releaseReserveAction, returnReserveAction } from "@/app/(workshop)/veneer/actions/reserves";

type Option = { id: string; label: string };

/** Re-veneer a damaged face from the pair's reserve, or give a reserve leaf back. */
export function ReserveForms({ pair, reserves, cabinets, positions }: { pair: string; reserves: Option[]; cabinets: Option[]; positions: string[] }) {
  const [released, release] = useActionState(releaseReserveAction, initialFormState);
  const [returned, giveBack] = useActionState(returnReserveAction, initialFormState);
  const opts = (o: Option[]) => o.map((x) => ({ value: x.id, label: x.label }));
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <form action={release} className="flex flex-col gap-3 rounded-lg border border-line p-4" data-testid="release-form">
        <h3 className="font-bold">Re-veneer a damaged face</h3>
        {released.message ? <Notice tone={released.ok ? "leaf" : "danger"}>{released.message}</Notice> : null}
        <input type="hidden" name="pair" value={pair} />
        <SelectField label="Reserve leaf" name="leafId" options={opts(reserves)} />
        <SelectField label="Cabinet" name="cabinetId" options={opts(cabinets)} errors={released.fieldErrors?.cabinetId} />
        <SelectField label="Face position to replace" name="position" options={positions.map((p) => ({ value: p, label: p }))} errors={released.fieldErrors?.position} />
        <TextField label="What happened to the face" name="reason" errors={released.fieldErrors?.reason} required />
        <div>
          <SubmitButton pendingLabel="Recording…">Use the reserve leaf</SubmitButton>
        </div>
      </form>
      <form action={giveBack} className="flex flex-col gap-3 rounded-lg border border-line p-4" data-testid="return-form">
        <h3 className="font-bold">Return a reserve leaf</h3>
        {returned.message ? <Notice tone={returned.ok ? "leaf" : "danger"}>{returned.message}</Notice> : null}
        <input type="hidden" name="pair" value={pair} />
        <SelectField label="Reserve leaf" name="leafId" options={opts(reserves)} />
        <TextField label="Why it is no longer needed" name="reason" errors={returned.fieldErrors?.reason} required />
        <div>
          <SubmitButton pendingLabel="Returning…" variant="secondary">
            Return to the flitch
          </SubmitButton>
        </div>
      </form>
    </div>
  );
}
