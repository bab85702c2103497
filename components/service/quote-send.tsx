"use client";
import type { ReactNode } from "react";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState, type FormState } from "@/lib/form-state";

type CaseAction = (state: FormState, formData: FormData) => Promise<FormState>;

/** One button that acts on a case (named by its code), with what it does above it and its answer on top. */
function CaseButtonForm(props: { code: string; action: CaseAction; testIds: { form: string; done: string; refused: string }; button: string; pending: string; children: ReactNode }) {
  const [state, run] = useActionState(props.action, initialFormState);
  return (
    <form action={run} className="flex flex-col gap-3" data-testid={props.testIds.form}>
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? props.testIds.done : props.testIds.refused}>
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="code" value={props.code} />
      <p>{props.children}</p>
      <div>
        <SubmitButton pendingLabel={props.pending}>{props.button}</SubmitButton>
      </div>
    </form>
  );
}

/** Sends the owner the payment link for the current quote. */
export function QuoteSend({ code, to, total, action }: { code: string; to: string; total: string; action: CaseAction }) {
  return (
    <CaseButtonForm code={code} action={action} testIds={{ form: "send-link-form", done: "link-sent", refused: "link-refused" }} button="Send the payment link" pending="Sending…">
      The owner gets an e-mail at <strong>{to}</strong> with a link to pay {total}. The case then waits for payment, and moves on by itself when the payment service confirms it.
    </CaseButtonForm>
  );
}

/** Gives a cancelled case's payment back to the owner, when the refund at the cancel did not go through. */
export function RefundSend({ code, action }: { code: string; action: CaseAction }) {
  return (
    <CaseButtonForm code={code} action={action} testIds={{ form: "refund-form", done: "refund-done", refused: "refund-refused" }} button="Refund the payment" pending="Refunding…">
      The case was cancelled after the owner paid, and the refund has not gone through yet. The whole payment goes back through the payment service, once.
    </CaseButtonForm>
  );
}
