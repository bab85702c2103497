/**
 * Packing and shipping: each tested pair packed with its speakers and coded accessories scanned
 * and the rest of its model's list ticked (`packPair`, which issues the certificate and gives
 * the carton its SSCC, in the order the history packs them, so the same seed gives the same SSCCs) and its certificate printed to go in the carton (`recordCertificatePrint`);
 * the cartons of each dealer shipped together every four weeks (`shipCartons`, with the dealer's
 * e-mail left out: those dealers had their mail when it happened, and the demo must not send it now).
 */
import { recordCertificatePrint } from "@/lib/certificates";
import { packingLines, packPair, shipCartons } from "@/lib/dispatch";
import { speakersOf } from "@/lib/genealogy/pair-speakers";
import { isoDay } from "@/lib/dispatch/dates";
import { MIN, plus, type Rng } from "./basics";
import { got, type PairPlan, type Plan } from "./plan";
import type { Shipment } from "./world";

// Invented carriers.
const CARRIERS = [
  { name: "Fernway Freight", prefix: "FW" },
  { name: "Calder & Moss Haulage", prefix: "CM" },
  { name: "Nordlys Fragt", prefix: "NF" },
] as const;

export function planPacking(plan: Plan, rng: Rng, p: PairPlan): void {
  const location = `Rack ${rng.pick(["A", "B", "C"])}, shelf ${rng.int(1, 4)}`;
  plan.add(p.t.packed, `packing ${p.key}`, async (ctx) => {
    const pair = got(ctx, p.key);
    // The packer scans both speakers and every coded accessory and ticks the rest, as the page asks.
    const { L, R } = await speakersOf(ctx.db, pair.id);
    const lines = await packingLines(ctx.db, pair);
    const packed = await packPair(
      ctx.db,
      {
        pairIdentity: pair.identity,
        left: L?.identity ?? "",
        right: R?.identity ?? "",
        scans: lines.filter((l) => l.mode === "scan").map((l) => l.code!),
        checked: lines.filter((l) => l.mode === "tick").map((l) => l.label),
        location,
      },
      ctx.ref.actors.packing,
    );
    ctx.items.set(`${p.key}:carton`, packed.carton);
    ctx.notes.set(`${p.key}:certificate`, packed.certificateId);
  });
  plan.add(plus(p.t.packed, MIN), `printing the certificate of ${p.key}`, async (ctx) => {
    const certificateId = String(ctx.notes.get(`${p.key}:certificate`));
    await recordCertificatePrint(ctx.db, certificateId, { actorId: ctx.ref.actors.packing.id, copy: false, station: "packing" });
  });
}

export function planShipments(plan: Plan, rng: Rng, shipments: Shipment[]): void {
  for (const s of shipments) {
    const carrier = rng.pick(CARRIERS);
    const tracking = `${carrier.prefix}${rng.int(10_000_000, 99_999_999)}`;
    plan.add(s.at, `shipping to ${s.dealer.code}`, async (ctx) => {
      await shipCartons(
        ctx.db,
        { dealerId: s.dealer.id, cartons: s.pairs.map((p) => got(ctx, `${p.key}:carton`).identity), shippedOn: isoDay(s.at), carrier: carrier.name, tracking },
        ctx.ref.actors.packing,
        { dealerMail: false },
      );
    });
  }
}
