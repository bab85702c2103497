"use client";
import { startTransition, useActionState, type FormEvent } from "react";

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

/**
 * `useActionState` whose `onOk` runs when the action answers ok, before the new state shows: the
 * place to clear a form for the next entry (an effect that sets state after rendering would draw
 * the old values once more).
 */
export function useActionStateThen<S extends { ok: boolean }>(action: (state: S, formData: FormData) => Promise<S>, initial: S, onOk: (state: S) => void) {
  const run = async (prev: S, formData: FormData): Promise<S> => {
    const next = await action(prev, formData);
    if (next.ok) onOk(next);
    return next;
  };
  return useActionState(run, initial as Awaited<S>);
}
