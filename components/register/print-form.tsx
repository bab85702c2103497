import type { ReactNode } from "react";
import { buttonClasses, type ButtonVariant } from "@/components/ui/button";
import { cx } from "@/components/ui/cx";

/**
 * A print button: a plain form POST (recorded by the server) that opens the printed PDF in a
 * new tab, where the server sends it on. Printing is never a link, so opening a page, a
 * prefetch or a reload prints nothing. `formId` renders only the form, empty, for a button
 * elsewhere (inside another form) that names it with `form=`.
 */
export function PrintForm({
  action,
  children,
  variant = "secondary",
  size = "md",
  testId,
  formId,
  className,
}: {
  action: string;
  children?: ReactNode;
  variant?: ButtonVariant;
  size?: "md" | "sm";
  testId?: string;
  formId?: string;
  className?: string;
}) {
  if (formId) return <form id={formId} method="post" action={action} target="_blank" hidden />;
  return (
    <form method="post" action={action} target="_blank" className="contents">
      <button type="submit" className={cx(buttonClasses(variant, size), className)} data-testid={testId}>
        {children}
      </button>
    </form>
  );
}
