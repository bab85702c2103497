"use client";
import { startTransition, type FormEvent } from "react";

/**
 * A form's submit handler that sends its data to a `useActionState` action by hand instead of as
 * the form's action: React resets a form after its action, which would clear controlled fields
 * (ticked boxes, chosen options) while the state still holds them. Ignores a second submit while
 * the first is pending.
 */
export function submitKeepingFields(action: (formData: FormData) => void, pending: boolean) {
  return (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    if (pending) return;
    const formData = new FormData(e.currentTarget);
    startTransition(() => action(formData));
  };
}
