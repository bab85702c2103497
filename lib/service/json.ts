/** A case as the JSON API answers it: serials and words, no internal ids. */
import "server-only";
import type { DbOrTx } from "@/db";
import type { ServiceCase } from "@/db/schema";
import { describeEvent } from "@/lib/events/describe";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { revisionsOfCase } from "@/lib/certificates/revisions";
import { caseHistory, caseMessages, caseParticulars, findingsOf, type CaseParticulars } from "./queries";
import { repairsOfCase } from "./repair";
import { reservationsOfCase } from "./replacements";
import { caseReturnOf } from "./return";
import type { Warranty } from "./warranty";

export const warrantyJson = (w: Warranty | null) =>
  w
    ? { inWarranty: w.inWarranty, shippedOn: w.shippedOn, endsOn: w.endsOn, startsOn: w.startsOn, rule: w.rule, months: w.months, daysLeft: w.daysLeft, daysOver: w.daysOver }
    : null;

export function caseSummaryJson(p: CaseParticulars) {
  return {
    code: p.case.code,
    state: p.case.state,
    stateWords: CASE_STATE_WORDS[p.case.state],
    speaker: p.item.kind === "speaker" ? p.item.identity : null,
    pair: p.pair.identity,
    partner: p.partner?.identity ?? null,
    returnedBy: p.case.returnedBy,
    receivedOn: p.case.receivedOn,
    symptom: p.case.symptom,
    model: p.model ? { code: p.model.code, name: p.model.name } : null,
    dealer: p.dealer ? { code: p.dealer.code, name: p.dealer.name } : null,
    warranty: warrantyJson(p.warranty),
  };
}

/**
 * One case with its findings, the parts it holds and has fitted, the certificate revisions it
 * issued, its way home, its history and its owner messages.
 */
export async function caseDetailJson(db: DbOrTx, c: ServiceCase) {
  const [p, findings, history, reservations, repairs, revisions, sentBack] = await Promise.all([
    caseParticulars(db, c),
    findingsOf(db, c.id),
    caseHistory(db, c.id),
    reservationsOfCase(db, c.id),
    repairsOfCase(db, c.id),
    revisionsOfCase(db, c.id),
    caseReturnOf(db, c.id),
  ]);
  const messages = await caseMessages(db, c.id, history);
  return {
    ...caseSummaryJson(p),
    owner: p.owner ? { name: p.owner.name, town: p.owner.town, country: p.owner.country, consent: p.owner.consent?.given ?? null } : null,
    findings: findings.map((f) => ({ side: f.side, position: f.position, finding: f.finding, at: f.createdAt.toISOString() })),
    reserved: reservations.filter((r) => !r.endedAt).map((r) => ({ side: r.side, position: r.position, serial: r.serial, since: r.createdAt.toISOString() })),
    repairs: repairs.map((r) => ({ side: r.side, position: r.position, removed: r.removed, fitted: r.fitted, disposition: r.disposition, reason: r.reason, at: r.at.toISOString() })),
    certificateRevisions: revisions.map((r) => ({ revision: r.revision, verifyCode: r.code, repairLine: r.repairLine, issuedAt: r.issuedAt.toISOString() })),
    sentBack: sentBack ? { to: sentBack.to, sentTo: sentBack.sentTo, carton: sentBack.carton, shipment: sentBack.shipment, shippedOn: sentBack.shippedOn, carrier: sentBack.carrier, tracking: sentBack.tracking } : null,
    history: history.map((e) => ({ at: e.at.toISOString(), type: e.type, what: describeEvent(e.type, e.data), by: e.actorName, reason: e.reason })),
    messages: messages.map((m) => ({ kind: m.kind, outcome: m.outcome, subject: m.outbox?.subject ?? null, delivery: m.outbox?.status ?? null })),
  };
}
