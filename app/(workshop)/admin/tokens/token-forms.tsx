"use client";
import { useActionState, useRef, useState } from "react";
import { useActionStateThen } from "@/components/ui/kept-form";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { useToast } from "@/components/ui/toast";
import { initialFormState } from "@/lib/form-state";
import { createTokenAction, revokeTokenAction } from "./actions";

/** The new token, shown in a read-only field until dismissed; it lives only in this page's memory. */
function NewToken({ token, name, onDone }: { token: string; name: string; onDone: () => void }) {
  const field = useRef<HTMLInputElement>(null);
  const toast = useToast();
  async function copy() {
    try {
      await navigator.clipboard.writeText(token);
    } catch {
      // No clipboard outside a secure context: select it for the user to copy by hand.
      field.current?.select();
      toast("Selected: copy it with your keyboard.");
      return;
    }
    toast("Copied.");
  }
  return (
    <Notice tone="caution" title={`The token for ${name}`} testId="new-token">
      <p className="mb-3">Copy it now: Twinleaf keeps only a fingerprint and cannot show it again.</p>
      <div className="flex flex-wrap items-end gap-2">
        <div className="min-w-0 flex-1">
          <TextField
            ref={field}
            label="Token"
            name="new-token"
            readOnly
            value={token}
            onFocus={(e) => e.currentTarget.select()}
            className="font-mono text-sm"
            spellCheck={false}
            autoComplete="off"
            data-testid="new-token-value"
          />
        </div>
        <Button variant="secondary" onClick={copy}>
          Copy
        </Button>
        <Button variant="quiet" onClick={onDone}>
          I have copied it
        </Button>
      </div>
      <p className="mt-3 text-sm">
        The bench sends it with every request as <code className="font-mono">Authorization: Bearer …</code>. Check it with <code className="font-mono">GET /api/v1/lab/whoami</code>.
      </p>
    </Notice>
  );
}

export function CreateTokenForm() {
  const [state, action] = useActionState(createTokenAction, initialFormState);
  const [dismissed, setDismissed] = useState<string | null>(null);
  const made = state.ok && state.data?.token && state.data.token !== dismissed ? state.data : null;
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : "");
  return (
    <div className="flex flex-col gap-4">
      {made ? <NewToken token={made.token!} name={made.name ?? ""} onDone={() => setDismissed(made.token!)} /> : null}
      <form action={action} className="flex flex-col gap-4" noValidate data-testid="create-token-form">
        {!state.ok && state.message ? <Notice tone="danger" testId="create-token-error">{state.message}</Notice> : null}
        <TextField
          label="Name"
          name="name"
          autoComplete="off"
          placeholder="Lab bench 2"
          hint="The bench or program that will use it, so the list and the event log say who posted a reading."
          defaultValue={state.ok ? "" : v("name")}
          errors={state.fieldErrors?.name}
          required
        />
        <input type="hidden" name="scope" value="lab" />
        <p>
          <span className="font-bold">Reaches:</span> the lab&apos;s endpoints only (<code className="font-mono">/api/v1/lab/…</code>), never a person&apos;s pages or any other part of the API.
        </p>
        <div>
          <SubmitButton pendingLabel="Making…">Make token</SubmitButton>
        </div>
      </form>
    </div>
  );
}

/**
 * The revoke button of one row. It stays mounted once the token is revoked (showing nothing), so
 * the confirmation toast still fires when the refreshed list arrives with the same render.
 */
export function RevokeTokenDialog({ tokenId, name, revoked }: { tokenId: string; name: string; revoked: boolean }) {
  const [open, setOpen] = useState(false);
  const toast = useToast();
  const [state, action] = useActionStateThen(revokeTokenAction, initialFormState, (s) => {
    if (s.message) toast(s.message);
    setOpen(false);
  });
  if (revoked) return null;
  return (
    <Dialog
      open={open}
      onOpenChange={setOpen}
      trigger="Revoke…"
      triggerLabel={`Revoke ${name}`}
      triggerVariant="danger"
      title={`Revoke ${name}?`}
      description="A bench using this token is refused from its next request. A revoked token cannot be brought back: make a new one instead."
    >
      <form action={action} className="flex flex-col gap-4" data-testid="revoke-token-form">
        {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
        <input type="hidden" name="tokenId" value={tokenId} />
        <TextField label="Why (optional)" name="reason" hint="Kept with the revocation in the event log, e.g. bench retired." errors={state.fieldErrors?.reason} />
        <SubmitButton variant="danger" pendingLabel="Revoking…">Revoke now</SubmitButton>
      </form>
    </Dialog>
  );
}
