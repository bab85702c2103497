import type { ComponentProps } from "react";
import { cx } from "./cx";

export function Table({ className, ...props }: ComponentProps<"table">) {
  return (
    // Positioned, so that text kept for screen readers (absolutely placed) scrolls with the table
    // instead of widening the whole page on a narrow screen.
    <div className="relative overflow-x-auto rounded-lg border border-line">
      <table className={cx("w-full border-collapse text-left text-base", className)} {...props} />
    </div>
  );
}
export function TH({ className, ...props }: ComponentProps<"th">) {
  return <th scope="col" className={cx("border-b border-line bg-paper px-3 py-2.5 text-sm font-bold text-ink-soft", className)} {...props} />;
}
export function TD({ className, ...props }: ComponentProps<"td">) {
  return <td className={cx("border-b border-line/70 px-3 py-2.5 align-top", className)} {...props} />;
}
export function TR({ className, ...props }: ComponentProps<"tr">) {
  return <tr className={cx("hover:bg-leaf-soft/40", className)} {...props} />;
}
