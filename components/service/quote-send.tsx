"use client";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState, type FormState } from "@/lib/forms";

/** Sends the owner the payment link for the current quote. */
export function QuoteSend({ code, to, total, action }: { code: string; to: string; total: string; action: (state: FormState, formData: FormData) => Promise<FormState> }) {
  const [state, run] = useActionState(action, initialFormState);
  return (
    <form action={run} className="flex flex-col gap-3" data-testid="send-link-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "link-sent" : "link-refused"}>
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="code" value={code} />
      <p>
        The owner gets an e-mail at <strong>{to}</strong> with a link to pay {total}. The case then waits for payment, and moves on by itself when the payment service confirms it.
      </p>
      <div>
        <SubmitButton pendingLabel="Sending…">Send the payment link</SubmitButton>
      </div>
    </form>
  );
}

/** Gives a cancelled case's payment back to the owner, when the refund at the cancel did not go through. */
export function RefundSend({ code, action }: { code: string; action: (state: FormState, formData: FormData) => Promise<FormState> }) {
  const [state, run] = useActionState(action, initialFormState);
  return (
    <form action={run} className="flex flex-col gap-3" data-testid="refund-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "refund-done" : "refund-refused"}>
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="code" value={code} />
      <p>The case was cancelled after the owner paid, and the refund has not gone through yet. The whole payment goes back through the payment service, once.</p>
      <div>
        <SubmitButton pendingLabel="Refunding…">Refund the payment</SubmitButton>
      </div>
    </form>
  );
}
