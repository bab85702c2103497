import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { EVENT_PHRASES, isEventType } from "@/lib/vocabulary/event-types";
import { dispositionPhrase, ncWhere, type Disposition } from "@/lib/route/words";

const DISPOSITIONS: readonly string[] = ["rework", "use_as_is", "scrap"] satisfies Disposition[];

/** A short sentence for an event; a type recorded before this list existed shows as it is. */
export function describeEvent(type: string, data: Record<string, unknown> = {}): string {
  const phrase = isEventType(type) ? EVENT_PHRASES[type] : type;
  const s = (k: string) => (typeof data[k] === "string" ? (data[k] as string) : "");
  if (type === "link.fitted") return `fitted into ${s("parent")} at ${s("position")}`;
  if (type === "link.removed") return `removed from ${s("parent")} at ${s("position")}`;
  if (type === "item.state_changed") return `${stateLabel(s("from"))} → ${stateLabel(s("to"))}`;
  if (type === "leaf.defect_noted") return `noted a defect: ${s("kind")}${s("note") ? ` (${s("note")})` : ""}`;
  if (type === "veneer.run_confirmed") return `confirmed a run for ${s("pair")}: left ${String(data.left ?? "")}, right ${String(data.right ?? "")} turned${Array.isArray(data.reserve) && data.reserve.length ? `, reserve ${String(data.reserve)}` : ""}`;
  if (type === "veneer.reserve_released") return `re-veneered ${s("cabinet")} at ${s("position")} with ${s("leaf")} (replacing ${s("replaces")})`;
  if (type === "route.step_recorded") return `recorded step ${String(data.seq ?? "")}, ${s("step").toLowerCase()}${Array.isArray(data.outOfWindow) && data.outOfWindow.length ? " (out of window)" : ""}`;
  if (type === "nc.opened") {
    const where = typeof data.seq === "number" ? ` ${ncWhere(data.seq, s("step") || null)}` : "";
    return `opened ${s("code")}${where}: ${s("finding")}`;
  }
  if (type === "nc.dispositioned") {
    const d = s("disposition");
    if (!DISPOSITIONS.includes(d)) return `dispositioned ${s("code")}`;
    const reworkToSeq = typeof data.reworkToSeq === "number" ? data.reworkToSeq : null;
    // Rework "back to" seq 0 is the final pair test's: adjust and test again.
    const phrase = dispositionPhrase({ disposition: d as Disposition, reworkToSeq, scrapped: s("scrapped") ? { side: null, identity: s("scrapped") } : null });
    return `dispositioned ${s("code")}: ${phrase}`;
  }
  if (type === "pair.final_tested") return data.pass ? "passed the final pair test" : "failed the final pair test";
  if (type === "certificate.printed") return data.copy ? "printed a copy of the certificate" : "printed the certificate";
  if (type === "label.printed") return data.reprint ? "reprinted a label" : phrase;
  return phrase;
}

/** What an event is about, in words: a code, e-mail or name it carries, else the bare id. */
export function subjectLabel(e: { subjectKind: string; subjectId: string; data: Record<string, unknown> }): string {
  const d = e.data;
  const label = [d.identity, d.child, d.code, d.email, d.name].find((v): v is string => typeof v === "string" && v.length > 0);
  return `${e.subjectKind} ${label ?? e.subjectId}`;
}
