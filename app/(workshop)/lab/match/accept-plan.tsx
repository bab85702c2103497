"use client";
import { useRouter } from "next/navigation";
import { useActionState, useEffect } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { acceptPlanAction } from "../actions/batches";

/** Accepting reserves every pair of the plan as a matched set; someone else's acceptance first redraws it. */
export function AcceptPlan({ batch, batchId, modelId, fsWeight, qtsWeight, pairs, count }: { batch: string; batchId: string; modelId: string; fsWeight: number; qtsWeight: number; pairs: string; count: number }) {
  const [state, action] = useActionState(acceptPlanAction, initialFormState);
  const router = useRouter();
  useEffect(() => {
    if (state.status === 409) router.refresh();
  }, [state, router]);
  return (
    <form action={action} className="flex flex-col gap-3" data-testid="accept-plan">
      {!state.ok && state.message ? <Notice tone="danger" testId="plan-refused">{state.message}</Notice> : null}
      <input type="hidden" name="batch" value={batch} />
      <input type="hidden" name="batchId" value={batchId} />
      <input type="hidden" name="modelId" value={modelId} />
      <input type="hidden" name="fsWeight" value={fsWeight} />
      <input type="hidden" name="qtsWeight" value={qtsWeight} />
      <input type="hidden" name="pairs" value={pairs} />
      <div>
        <SubmitButton pendingLabel="Reserving…">Accept the plan: reserve {count} set{count === 1 ? "" : "s"}</SubmitButton>
      </div>
      <p className="text-sm text-ink-soft">Each set&apos;s two units are held for one future speaker pair, left and right, until assembly fits them.</p>
    </form>
  );
}
