"use client";
import Link from "next/link";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { signInAction } from "./actions";

export function SignInForm({ next }: { next?: string }) {
  const [state, action] = useActionState(signInAction, initialFormState);
  const email = typeof state.values?.email === "string" ? state.values.email : "";
  return (
    <form action={action} className="flex flex-col gap-5" noValidate data-testid="sign-in-form">
      {state.message && !state.ok ? (
        <Notice tone="danger" testId="sign-in-error">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="next" value={next ?? ""} />
      <TextField label="E-mail" name="email" type="email" autoComplete="username" defaultValue={email} key={email} errors={state.fieldErrors?.email} required />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" errors={state.fieldErrors?.password} required />
      <SubmitButton pendingLabel="Signing in…">Sign in</SubmitButton>
      <Link href="/reset" className="text-center font-bold text-leaf-dark underline underline-offset-4">
        Forgotten your password?
      </Link>
    </form>
  );
}
