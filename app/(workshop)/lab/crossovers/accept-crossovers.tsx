"use client";
import { useRouter } from "next/navigation";
import { useActionState, useEffect } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { acceptCrossoverPlanAction } from "./actions";

/**
 * Accepting reserves every pair of the plan as a matched set of boards; someone else's acceptance
 * first redraws it. The page keeps this mounted even when the plan has no pair, so the answer to
 * the last acceptance stays visible after the refresh that follows it.
 */
export function AcceptCrossovers({ modelId, limitDb, pairs, count }: { modelId: string; limitDb: number; pairs: string; count: number }) {
  const [state, action] = useActionState(acceptCrossoverPlanAction, initialFormState);
  const router = useRouter();
  useEffect(() => {
    if (state.ok || state.status === 409) router.refresh();
  }, [state, router]);
  return (
    <form action={action} className="flex flex-col gap-3" data-testid="accept-crossovers">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "crossovers-accepted" : "crossovers-refused"}>
          {state.message}
        </Notice>
      ) : null}
      {count > 0 ? (
        <>
          <input type="hidden" name="modelId" value={modelId} />
          <input type="hidden" name="limitDb" value={limitDb} />
          <input type="hidden" name="pairs" value={pairs} />
          <div>
            <SubmitButton pendingLabel="Reserving…">
              Accept the plan: reserve {count} set{count === 1 ? "" : "s"} of boards
            </SubmitButton>
          </div>
          <p className="text-sm text-ink-soft">Each set&apos;s two boards are held for one future speaker pair, left and right, until assembly fits them.</p>
        </>
      ) : null}
    </form>
  );
}
