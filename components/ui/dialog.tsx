"use client";
import * as RadixDialog from "@radix-ui/react-dialog";
import type { ReactNode } from "react";
import { buttonClasses, type ButtonVariant } from "./button";

/** A modal dialog (Radix: focus trap, Escape, labelled by its title). */
export function Dialog({ trigger, triggerLabel, triggerVariant = "secondary", title, description, children, open, onOpenChange }: {
  trigger?: ReactNode;
  /** The trigger's accessible name when its text alone is ambiguous (one of many rows). */
  triggerLabel?: string;
  triggerVariant?: ButtonVariant;
  title: ReactNode;
  description?: ReactNode;
  children: ReactNode;
  open?: boolean;
  onOpenChange?: (open: boolean) => void;
}) {
  return (
    <RadixDialog.Root open={open} onOpenChange={onOpenChange}>
      {trigger ? <RadixDialog.Trigger className={buttonClasses(triggerVariant, "sm")} aria-label={triggerLabel}>{trigger}</RadixDialog.Trigger> : null}
      <RadixDialog.Portal>
        <RadixDialog.Overlay className="fixed inset-0 z-40 bg-ink/40" />
        <RadixDialog.Content className="fixed left-1/2 top-1/2 z-50 max-h-[90vh] w-[min(36rem,92vw)] -translate-x-1/2 -translate-y-1/2 overflow-y-auto rounded-xl border border-line bg-surface p-6 shadow-xl">
          <RadixDialog.Title className="text-xl font-bold">{title}</RadixDialog.Title>
          {description ? <RadixDialog.Description className="mt-1 text-ink-soft">{description}</RadixDialog.Description> : null}
          <div className="mt-4">{children}</div>
          <RadixDialog.Close className={`${buttonClasses("quiet", "sm")} absolute right-3 top-3`} aria-label="Close">
            ✕
          </RadixDialog.Close>
        </RadixDialog.Content>
      </RadixDialog.Portal>
    </RadixDialog.Root>
  );
}

export const DialogClose = RadixDialog.Close;
