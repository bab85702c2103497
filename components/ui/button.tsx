import type { ComponentProps } from "react";
import { cx } from "./cx";

export type ButtonVariant = "primary" | "secondary" | "danger" | "quiet";

const VARIANTS: Record<ButtonVariant, string> = {
  primary: "bg-leaf text-white hover:bg-leaf-dark border-leaf-dark",
  secondary: "bg-surface text-ink hover:bg-leaf-soft border-line-strong",
  danger: "bg-danger text-white hover:brightness-95 border-danger",
  quiet: "bg-transparent text-leaf-dark hover:bg-leaf-soft border-transparent underline-offset-4 hover:underline",
};

export function buttonClasses(variant: ButtonVariant = "primary", size: "md" | "sm" = "md") {
  return cx(
    "inline-flex items-center justify-center gap-2 rounded-lg border font-bold transition-colors",
    "disabled:cursor-not-allowed disabled:opacity-60",
    // 48 px tall by default: a comfortable touch target on a shop tablet.
    size === "md" ? "min-h-12 px-5 text-base" : "min-h-10 px-3 text-sm",
    VARIANTS[variant],
  );
}

export function Button({ variant = "primary", size = "md", className, type = "button", ...props }: ComponentProps<"button"> & { variant?: ButtonVariant; size?: "md" | "sm" }) {
  return <button type={type} className={cx(buttonClasses(variant, size), className)} {...props} />;
}
