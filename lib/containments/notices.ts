import "server-only";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { containmentItems, containmentNotices, dealers, type Containment } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { queueMail } from "@/lib/mail/outbox";
import { containmentDealerMail, containmentOwnerMail } from "@/lib/mail/templates";
import { issueConsentLink, mailBaseUrl, ownerLinkPaths } from "@/lib/owners/registrations";
import type { Actor } from "@/lib/vocabulary/actor";
import { SEVERITY_LABEL } from "@/lib/vocabulary/containments";
import { KIND_WORD, isItemKind } from "@/lib/vocabulary/item-kinds";
import { QUALITY_STATION } from "./raise";
import { containmentOrRefuse } from "./work";

interface OwnerToTell {
  ownerId: string;
  name: string;
  email: string;
  pairs: { pair: string; model: string; dealer: string | null }[];
}

/**
 * The registered owners of the containment's shipped pairs whose newest word is consent to be
 * contacted and who gave an e-mail, each with their affected pairs. An owner who withdrew consent
 * (newest row) is left out.
 */
export async function ownersToTell(db: DbOrTx, containmentId: string): Promise<OwnerToTell[]> {
  const rows = await db.all<{ owner_id: string; name: string; email: string | null; pair: string; model: string | null; dealer: string | null; consent: number | null }>(sql`
    SELECT o.id AS owner_id, o.name, o.email, p.identity AS pair, m.name AS model, d.name AS dealer,
           (SELECT oc.consent FROM owner_consents oc WHERE oc.owner_id = o.id ORDER BY oc.id DESC LIMIT 1) AS consent
    FROM containment_items ci
    JOIN items p ON p.id = ci.item_id AND ci.kind = 'pair'
    LEFT JOIN models m ON m.id = p.model_id
    LEFT JOIN dealers d ON d.id = ci.dealer_id
    JOIN (SELECT DISTINCT owner_id, item_id FROM ownerships) os ON os.item_id = p.id
    JOIN owners o ON o.id = os.owner_id
    WHERE ci.containment_id = ${containmentId} AND ci."group" = 'shipped'
    ORDER BY o.name, p.identity`);
  const byOwner = new Map<string, OwnerToTell>();
  for (const r of rows) {
    if (!r.email || !r.consent) continue;
    const o = byOwner.get(r.owner_id) ?? { ownerId: r.owner_id, name: r.name, email: r.email, pairs: [] };
    if (!o.pairs.some((p) => p.pair === r.pair)) o.pairs.push({ pair: r.pair, model: r.model ?? "speakers", dealer: r.dealer });
    byOwner.set(r.owner_id, o);
  }
  return [...byOwner.values()];
}

export interface NoticesSent {
  dealers: number;
  owners: number;
}

/**
 * Tells everyone the containment owes a notice and has not told yet: each dealer of its shipped
 * serials one message listing theirs, and each consenting registered owner one message in plain
 * words (`ownerWords`, quality's plain account for owners). Each notice is queued in the outbox with its event in one transaction; the dealer's
 * serials become "notified". Refuses when there is no one left to tell.
 */
export async function sendNotices(db: DbOrTx, input: { code: string; ownerWords?: unknown }, actor: Actor): Promise<NoticesSent> {
  const c = await containmentOrRefuse(db, input.code);
  const ownerWords = typeof input.ownerWords === "string" ? input.ownerWords.trim().replace(/\s+/g, " ") : "";
  if (ownerWords.length > 1000) throw new AppError(400, "Keep the words for owners to 1000 characters.", { ownerWords: ["Keep the words for owners to 1000 characters."] });
  if (c.closedAt) throw new AppError(409, `Containment ${c.code} is closed: no more notices go out for it.`);
  const run = async (tx: DbOrTx): Promise<NoticesSent> => {
    const told = await tx.select().from(containmentNotices).where(eq(containmentNotices.containmentId, c.id));
    const toldDealers = new Set(told.flatMap((n) => (n.dealerId ? [n.dealerId] : [])));
    const toldOwners = new Set(told.flatMap((n) => (n.ownerId ? [n.ownerId] : [])));

    const shipped = await tx
      .select({ id: containmentItems.id, identity: containmentItems.identity, kind: containmentItems.kind, state: containmentItems.state, dealerId: containmentItems.dealerId })
      .from(containmentItems)
      .where(and(eq(containmentItems.containmentId, c.id), eq(containmentItems.group, "shipped")));
    const dealerIds = [...new Set(shipped.flatMap((r) => (r.dealerId && !toldDealers.has(r.dealerId) ? [r.dealerId] : [])))];
    const dealerRows = dealerIds.length ? await tx.select().from(dealers).where(inArray(dealers.id, dealerIds)) : [];
    const owners = (await ownersToTell(tx, c.id)).filter((o) => !toldOwners.has(o.ownerId));
    if (dealerRows.length === 0 && owners.length === 0) {
      throw new AppError(
        409,
        shipped.length === 0
          ? `None of the serials of ${c.code} has shipped, so there is no dealer or owner to tell.`
          : `Every dealer and every consenting owner of ${c.code} has been told already. Nothing was sent.`,
      );
    }
    const at = now();
    for (const d of dealerRows.sort((a, b) => a.name.localeCompare(b.name))) {
      const theirs = shipped.filter((r) => r.dealerId === d.id);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: QUALITY_STATION,
        type: "containment.notified",
        subjectKind: "containment",
        subjectId: c.id,
        data: { code: c.code, dealer: d.name, dealerCode: d.code, serials: theirs.length },
        at,
      });
      const mail = containmentDealerMail({
        dealerName: d.name,
        code: c.code,
        target: c.targetLabel,
        reason: c.reason,
        severity: SEVERITY_LABEL[c.severity],
        serials: theirs.map((r) => ({ serial: r.identity, what: isItemKind(r.kind) ? KIND_WORD[r.kind] : r.kind })),
      });
      const outboxId = await queueMail(tx, { to: d.email, subject: mail.subject, text: mail.text, html: mail.html, eventId });
      await tx.insert(containmentNotices).values({ containmentId: c.id, dealerId: d.id, ownerId: null, outboxId, serials: theirs.length, eventId, createdAt: at });
      const waiting = theirs.filter((r) => r.state === "open").map((r) => r.id);
      for (let i = 0; i < waiting.length; i += 500) {
        await tx.update(containmentItems).set({ state: "notified", eventId }).where(inArray(containmentItems.id, waiting.slice(i, i + 500)));
      }
    }
    for (const o of owners) {
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: QUALITY_STATION,
        type: "containment.notified",
        subjectKind: "containment",
        subjectId: c.id,
        data: { code: c.code, owner: o.ownerId, serials: o.pairs.length },
        at,
      });
      const withdraw = await issueConsentLink(tx, { ownerId: o.ownerId });
      const mail = containmentOwnerMail({
        ownerName: o.name,
        code: c.code,
        pairs: o.pairs,
        reason: ownerWords || null,
        critical: c.severity === "critical",
        dealers: [...new Set(o.pairs.flatMap((p) => (p.dealer ? [p.dealer] : [])))],
        withdrawLink: `${mailBaseUrl()}${ownerLinkPaths.consent(withdraw)}`,
      });
      const outboxId = await queueMail(tx, { to: o.email, subject: mail.subject, text: mail.text, html: mail.html, eventId, secrets: [withdraw] });
      await tx.insert(containmentNotices).values({ containmentId: c.id, dealerId: null, ownerId: o.ownerId, outboxId, serials: o.pairs.length, eventId, createdAt: at });
    }
    return { dealers: dealerRows.length, owners: owners.length };
  };
  return "rollback" in db ? run(db) : db.transaction(run);
}

export type { Containment };
