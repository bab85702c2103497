import { stateLabel } from "@/lib/genealogy/kinds";

/** A short human sentence for an event type; unknown types show as they are. */
const PHRASES: Record<string, string> = {
  "user.signed_in": "signed in",
  "user.invited": "invited a user",
  "user.joined": "accepted an invitation",
  "user.roles_changed": "changed roles",
  "user.deactivated": "deactivated a user",
  "user.reactivated": "reactivated a user",
  "user.reset_requested": "asked for a password reset",
  "user.password_reset": "set a new password",
  "user.created": "created a user",
  "model.created": "registered a model",
  "finish.created": "registered a finish",
  "dealer.created": "registered a dealer",
  "item.created": "registered",
  "item.state_changed": "changed state",
  "link.fitted": "fitted",
  "link.removed": "removed",
  "label.printed": "printed a label",
  "ownership.registered": "registered the owner",
  "event.corrected": "corrected an earlier record",
  "flitch.received": "received a flitch",
  "leaf.measured": "recorded a leaf",
  "leaf.defect_noted": "noted a defect",
  "leaf.defect_cleared": "cleared a defect",
  "veneer.run_confirmed": "confirmed a bookmatched run",
  "veneer.reserve_released": "re-veneered a face from the reserve",
  "veneer.reserve_returned": "returned a reserve leaf",
  "cabinet.batch_started": "started a batch of lacquer cabinets",
  "upload.stored": "added a photo",
  "batch.received": "registered a batch of units",
  "unit.response_measured": "measured a response",
  "unit.ts_measured": "measured Thiele–Small parameters",
  "set.matched": "reserved a matched set",
  "route.started": "started the cabinet route",
  "route.step_recorded": "recorded a route step",
  "nc.opened": "opened a nonconformance",
  "nc.dispositioned": "dispositioned a nonconformance",
  "spec.created": "saved a route version",
  "pair.final_tested": "tested the finished pair",
  "pair.assembled": "built the pair's speakers",
  "pair.inspected": "did the final clean and inspection",
  "pair.packed": "packed the pair",
  "set.member_fitted": "fitted a unit of a matched set",
  "pair.lacquer_paired": "paired two lacquer cabinets",
  "certificate.issued": "issued the certificate",
  "certificate.printed": "printed the certificate",
  "carton.moved": "moved a carton",
  "shipment.sent": "shipped cartons",
  "crossover.built": "built a crossover board",
  "machine_token.created": "created a machine token",
  "machine_token.revoked": "revoked a machine token",
};

export function describeEvent(type: string, data: Record<string, unknown> = {}): string {
  const phrase = PHRASES[type] ?? type;
  const s = (k: string) => (typeof data[k] === "string" ? (data[k] as string) : "");
  if (type === "link.fitted") return `fitted into ${s("parent")} at ${s("position")}`;
  if (type === "link.removed") return `removed from ${s("parent")} at ${s("position")}`;
  if (type === "item.state_changed") return `${stateLabel(s("from"))} → ${stateLabel(s("to"))}`;
  if (type === "leaf.defect_noted") return `noted a defect: ${s("kind")}${s("note") ? ` (${s("note")})` : ""}`;
  if (type === "veneer.run_confirmed") return `confirmed a run for ${s("pair")}: left ${String(data.left ?? "")}, right ${String(data.right ?? "")} turned${Array.isArray(data.reserve) && data.reserve.length ? `, reserve ${String(data.reserve)}` : ""}`;
  if (type === "veneer.reserve_released") return `re-veneered ${s("cabinet")} at ${s("position")} with ${s("leaf")} (replacing ${s("replaces")})`;
  if (type === "route.step_recorded") return `recorded step ${String(data.seq ?? "")}, ${s("step").toLowerCase()}${Array.isArray(data.outOfWindow) && data.outOfWindow.length ? " (out of window)" : ""}`;
  if (type === "nc.opened") return `opened ${s("code")}: ${s("finding")}`;
  if (type === "nc.dispositioned") return `dispositioned ${s("code")}: ${s("disposition").replace(/_/g, " ")}`;
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
