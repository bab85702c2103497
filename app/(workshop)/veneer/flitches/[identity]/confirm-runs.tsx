"use client";
import { useRouter } from "next/navigation";
import { leafList } from "@/lib/veneer/plan";
import { useActionState, useEffect } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import type { PlanRun } from "@/lib/veneer/plan";
import { confirmRunsAction } from "../../actions/confirm";

const encode = (r: PlanRun) => `${r.left.join(",")}|${r.right.join(",")}|${r.reserve.join(",")}`;

/** The plan's runs, all ticked; confirming makes a pair for each ticked run. */
export function ConfirmRuns({ flitch, flitchId, modelId, modelName, reservePerPair, runs }: { flitch: string; flitchId: string; modelId: string; modelName: string; reservePerPair: number; runs: PlanRun[] }) {
  const [state, action] = useActionState(confirmRunsAction, initialFormState);
  const router = useRouter();
  // Someone else took leaves first: draw the plan again from what is still free.
  useEffect(() => {
    if (!state.ok && state.status === 409) router.refresh();
  }, [state, router]);
  return (
    <form action={action} className="flex flex-col gap-4" data-testid="confirm-runs">
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="confirm-error">
          {state.message}
          {state.fieldErrors?.runs ? ` ${state.fieldErrors.runs.join(" ")}` : ""}
        </Notice>
      ) : null}
      <input type="hidden" name="flitch" value={flitch} />
      <input type="hidden" name="flitchId" value={flitchId} />
      <input type="hidden" name="modelId" value={modelId} />
      <input type="hidden" name="reservePerPair" value={reservePerPair} />
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Runs to confirm as {modelName} pairs</legend>
        {runs.map((r, i) => (
          <label key={encode(r)} className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border border-line bg-surface px-3 has-checked:border-leaf has-checked:bg-leaf-soft">
            <input type="checkbox" name="runs" value={encode(r)} defaultChecked className="size-5 accent-leaf" data-testid={`run-${i + 1}`} />
            <span>
              <span className="font-bold">Run {i + 1}</span>: left face {leafList(r.left)} · right face {leafList(r.right)} turned over
              {r.reserve.length ? ` · reserve ${leafList(r.reserve)}` : ""}
            </span>
          </label>
        ))}
      </fieldset>
      <p className="text-sm text-ink-soft">Each ticked run becomes a pair with its two cabinets and their serials; the label sheet opens next.</p>
      <div>
        <SubmitButton pendingLabel="Making the pairs…">Confirm and make pairs</SubmitButton>
      </div>
    </form>
  );
}
