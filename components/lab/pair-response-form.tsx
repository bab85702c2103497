"use client";
import { useActionState, useState, type ReactNode } from "react";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState, type FormState } from "@/lib/form-state";

const fileClasses = `${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`;

type Side = "left" | "right";

/**
 * A finished pair's left and right responses, read in the browser and sent as text
 * (`leftName`/`leftText`, `rightName`/`rightText`): the lab's final test and the service desk's
 * re-test. `fields` renders the form's own fields above the files, given the answer's state.
 */
export function PairResponseForm({
  action,
  testIds,
  fields,
}: {
  action: (state: FormState, data: FormData) => Promise<FormState>;
  testIds: { form: string; error: string; file: string };
  fields?: (state: FormState) => ReactNode;
}) {
  const [state, formAction] = useActionState(action, initialFormState);
  const [files, setFiles] = useState<Record<Side, { name: string; text: string } | null>>({ left: null, right: null });
  const pick = (side: Side) => async (e: React.ChangeEvent<HTMLInputElement>) => {
    const f = e.currentTarget.files?.[0];
    const read = f ? { name: f.name, text: await f.text() } : null;
    setFiles((x) => ({ ...x, [side]: read }));
  };
  return (
    <form action={formAction} className="flex flex-col gap-4" data-testid={testIds.form}>
      {!state.ok && state.message ? (
        <Notice tone="danger" testId={testIds.error}>
          {state.message}
          {state.fieldErrors?.files ? (
            <ul className="mt-1 list-disc pl-5">
              {state.fieldErrors.files.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      {fields?.(state)}
      {(["left", "right"] as const).map((side) => (
        <label key={side} className="flex flex-col gap-1">
          <span className="font-bold">{side === "left" ? "Left" : "Right"} speaker’s response</span>
          <input
            type="file"
            accept=".txt,.frd,.csv,.dat,text/plain"
            className={fileClasses}
            onChange={pick(side)}
            data-testid={`${testIds.file}-${side}`}
            aria-describedby={state.fieldErrors?.[`${side}Text`] ? `${testIds.file}-${side}-error` : undefined}
          />
          <input type="hidden" name={`${side}Name`} value={files[side]?.name ?? ""} />
          <input type="hidden" name={`${side}Text`} value={files[side]?.text ?? ""} />
          {state.fieldErrors?.[`${side}Text`] ? (
            <span id={`${testIds.file}-${side}-error`} className="text-sm text-danger">
              {state.fieldErrors[`${side}Text`]![0]}
            </span>
          ) : null}
        </label>
      ))}
      <div>
        <SubmitButton pendingLabel="Comparing…">Compare left and right</SubmitButton>
      </div>
    </form>
  );
}
