import Link from "next/link";
import { Notice } from "@/components/ui/notice";
import { paths } from "@/lib/paths";

/** What a page needs of an open containment's hold (lib/containments `Hold`). */
export interface HoldShown {
  code: string;
  reason: string;
  heldIdentity: string;
}

/**
 * The banner a station shows while an open containment holds what it works on: each containment
 * once, its code linked to its page, its reason, and that nothing moves until quality releases it.
 */
export function ContainmentHold({ holds, identity, className }: { holds: readonly HoldShown[]; identity: string; className?: string }) {
  const byCode = new Map<string, HoldShown>();
  for (const h of holds) if (!byCode.has(h.code)) byCode.set(h.code, h);
  if (byCode.size === 0) return null;
  return (
    <Notice tone="danger" title={`${identity} is on hold until quality releases it`} className={className} testId="containment-hold">
      <ul className="flex flex-col gap-1">
        {[...byCode.values()].map((h) => (
          <li key={h.code} data-testid="containment-hold-code">
            Containment{" "}
            <Link href={paths.containment(h.code)} className="serial font-bold text-leaf-dark underline">
              {h.code}
            </Link>
            {h.heldIdentity !== identity ? <> (through <span className="serial">{h.heldIdentity}</span>)</> : null}: {h.reason}
          </li>
        ))}
      </ul>
      <p className="mt-1">Nothing is recorded, fitted, packed or shipped for it until quality clears it or closes the containment.</p>
    </Notice>
  );
}

/** A list's mark in place of an action: "Held by CN2612-0001", linked to the containment. */
export function HeldMark({ code }: { code: string }) {
  return (
    <span className="inline-flex items-center rounded-lg border border-danger bg-danger-soft px-2 py-1 font-bold text-danger" data-testid="held-mark">
      Held by&nbsp;
      <Link href={paths.containment(code)} className="serial underline">
        {code}
      </Link>
    </span>
  );
}

/** How many serials a note names before it counts the rest. */
const SHOWN = 8;

/** "2 units were left out: held by containment CN2612-0001 until quality releases them." */
export function LeftOutNote({ quarantined, one, many, className }: { quarantined: readonly { identity: string; code: string }[]; one: string; many: string; className?: string }) {
  if (!quarantined.length) return null;
  const codes = [...new Set(quarantined.map((q) => q.code))];
  const n = quarantined.length;
  return (
    <Notice tone="caution" testId="left-out-held" className={className}>
      {n} {n === 1 ? one : many} {n === 1 ? "was" : "were"} left out: held by containment{" "}
      {codes.map((code, i) => (
        <span key={code}>
          {i ? ", " : ""}
          <Link href={paths.containment(code)} className="serial font-bold text-leaf-dark underline">
            {code}
          </Link>
        </span>
      ))}{" "}
      until quality releases {n === 1 ? "it" : "them"} (<span className="serial">{quarantined.slice(0, SHOWN).map((q) => q.identity).join(", ")}</span>
      {n > SHOWN ? ` and ${n - SHOWN} more` : ""}).
    </Notice>
  );
}
