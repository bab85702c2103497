import type { ReactNode } from "react";
import { cx } from "./cx";

export type Tone = "neutral" | "leaf" | "walnut" | "caution" | "danger" | "info";

const TONES: Record<Tone, string> = {
  neutral: "bg-paper text-ink border-line-strong",
  leaf: "bg-leaf-soft text-leaf-dark border-leaf/40",
  walnut: "bg-walnut-soft text-walnut border-walnut/40",
  caution: "bg-caution-soft text-caution border-caution/40",
  danger: "bg-danger-soft text-danger border-danger/40",
  info: "bg-info-soft text-info border-info/40",
};

export function Badge({ tone = "neutral", children, className }: { tone?: Tone; children: ReactNode; className?: string }) {
  return <span className={cx("inline-flex items-center whitespace-nowrap rounded-full border px-2.5 py-0.5 text-sm font-bold", TONES[tone], className)}>{children}</span>;
}
