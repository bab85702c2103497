import type { ReactNode } from "react";
import { cx } from "./cx";
import type { Tone } from "./badge";

const TONES: Record<Exclude<Tone, "neutral" | "walnut">, string> = {
  leaf: "border-leaf bg-leaf-soft",
  caution: "border-caution bg-caution-soft",
  danger: "border-danger bg-danger-soft",
  info: "border-info bg-info-soft",
};

/** A boxed message. Errors are announced (role="alert"); everything else politely (role="status"). */
export function Notice({ tone = "info", title, children, className, testId }: { tone?: keyof typeof TONES; title?: ReactNode; children?: ReactNode; className?: string; testId?: string }) {
  return (
    <div role={tone === "danger" ? "alert" : "status"} data-testid={testId} className={cx("rounded-lg border-l-4 px-4 py-3", TONES[tone], className)}>
      {title ? <p className="font-bold">{title}</p> : null}
      {children ? <div className="text-base">{children}</div> : null}
    </div>
  );
}
