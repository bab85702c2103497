"use client";
import type { ComponentProps } from "react";
import { useFormStatus } from "react-dom";
import { Button, type ButtonVariant } from "./button";

/** A submit button that shows it is working while its form's action runs. */
export function SubmitButton({ children, pendingLabel = "Working…", variant, ...props }: ComponentProps<"button"> & { pendingLabel?: string; variant?: ButtonVariant }) {
  const { pending } = useFormStatus();
  return (
    <Button type="submit" variant={variant} disabled={pending} aria-busy={pending} {...props}>
      {pending ? pendingLabel : children}
    </Button>
  );
}
