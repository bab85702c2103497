"use client";
import { useActionState } from "react";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { signOutAction } from "./sign-out";

export function SignOutButton() {
  const [, action] = useActionState(signOutAction, initialFormState);
  return (
    <form action={action}>
      <SubmitButton variant="secondary" pendingLabel="Signing out…">
        Sign out
      </SubmitButton>
    </form>
  );
}
