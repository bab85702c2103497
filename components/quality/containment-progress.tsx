import { AFFECTED_GROUPS, AFFECTED_STATE_WORDS, AFFECTED_STATES, GROUP_LABEL, type AffectedGroup, type AffectedState } from "@/lib/vocabulary/containments";
import { cx } from "@/components/ui/cx";

/** A small bar: how much of a containment is dispositioned. The words beside it say the same. */
export function ProgressBar({ done, total, className }: { done: number; total: number; className?: string }) {
  const pct = total ? Math.round((done / total) * 100) : 0;
  return (
    <span className={cx("flex items-center gap-2", className)}>
      <span className="relative block h-2.5 w-24 shrink-0 overflow-hidden rounded-full bg-line" aria-hidden="true">
        <span className="absolute inset-y-0 left-0 rounded-full bg-leaf" style={{ width: `${pct}%` }} />
      </span>
      <span className="whitespace-nowrap text-sm">
        {done} of {total} dealt with
      </span>
    </span>
  );
}

// One colour per state, from "still to do" (warm) to "done" (leaf); the legend names each.
const STATE_FILL: Record<AffectedState, string> = {
  open: "bg-danger",
  notified: "bg-caution",
  passed: "bg-info",
  failed: "bg-walnut",
  cleared: "bg-leaf",
  replaced: "bg-leaf-dark",
};

/**
 * One stacked bar per group, each segment a state, widths to the group's share of the whole;
 * every bar also says its numbers, so the picture is never the only account.
 */
export function ProgressChart({ cells, total }: { cells: { group: AffectedGroup; state: AffectedState; n: number }[]; total: number }) {
  const groups = AFFECTED_GROUPS.map((g) => ({ group: g, parts: AFFECTED_STATES.map((s) => ({ state: s, n: cells.filter((c) => c.group === g && c.state === s).reduce((a, c) => a + c.n, 0) })).filter((p) => p.n > 0) }));
  const present = AFFECTED_STATES.filter((s) => cells.some((c) => c.state === s && c.n > 0));
  return (
    <figure className="flex flex-col gap-3" data-testid="containment-chart">
      <div className="flex flex-col gap-2">
        {groups.map(({ group, parts }) => {
          const n = parts.reduce((a, p) => a + p.n, 0);
          return (
            <div key={group} className="grid grid-cols-[6rem_1fr] items-center gap-3 sm:grid-cols-[7rem_1fr_14rem]">
              <span className="font-bold">{GROUP_LABEL[group]}</span>
              <span className="flex h-6 w-full overflow-hidden rounded bg-paper ring-1 ring-line" aria-hidden="true">
                {parts.map((p) => (
                  <span key={p.state} className={cx("h-full", STATE_FILL[p.state])} style={{ width: `${total ? (p.n / total) * 100 : 0}%` }} title={`${AFFECTED_STATE_WORDS[p.state]}: ${p.n}`} />
                ))}
              </span>
              <span className="col-span-2 text-sm text-ink-soft sm:col-span-1">{n ? parts.map((p) => `${p.n} ${AFFECTED_STATE_WORDS[p.state].toLowerCase()}`).join(", ") : "none"}</span>
            </div>
          );
        })}
      </div>
      <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
        {present.map((s) => (
          <span key={s} className="flex items-center gap-1.5">
            <span className={cx("inline-block size-3 rounded-sm", STATE_FILL[s])} aria-hidden="true" />
            {AFFECTED_STATE_WORDS[s]}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
