import Link from "next/link";
import { cx } from "@/components/ui/cx";

const OPTIONS = [
  { value: "now", label: "Now" },
  { value: "built", label: "As built" },
  { value: "ever", label: "Everything ever" },
];

/** Now / as built / ever, and a date: plain links and a GET form, so each view has its own address. */
export function MomentSwitch({ current, hasShipped }: { current: string; hasShipped: boolean }) {
  const isDate = !OPTIONS.some((o) => o.value === current);
  return (
    <div className="flex flex-wrap items-center gap-2" data-testid="moment-switch">
      <nav aria-label="Show the trace" className="flex gap-1">
        {OPTIONS.filter((o) => o.value !== "built" || hasShipped).map((o) => (
          <Link
            key={o.value}
            href={`?at=${o.value}`}
            aria-current={current === o.value ? "true" : undefined}
            className={cx("flex min-h-10 items-center rounded-lg border px-3 text-sm font-bold", current === o.value ? "border-leaf bg-leaf text-white" : "border-line-strong bg-surface hover:bg-leaf-soft")}
          >
            {o.label}
          </Link>
        ))}
      </nav>
      <form method="get" className="flex items-center gap-1">
        <label htmlFor="as-of" className="text-sm font-bold">
          As of
        </label>
        <input id="as-of" name="at" type="date" defaultValue={isDate ? current.slice(0, 10) : ""} className="min-h-10 rounded-lg border border-line-strong bg-surface px-2" />
        <button type="submit" className="min-h-10 rounded-lg border border-line-strong bg-surface px-3 text-sm font-bold hover:bg-leaf-soft">
          Show
        </button>
      </form>
    </div>
  );
}
