/**
 * The certificate says only what is true when it is printed: a pair tested but not packed has no
 * packing line and says nothing of a carton or of shipping; packed, it names its packer and
 * carton; shipped, a copy says the original went with it; after a repair, the copy shows the part
 * that was replaced and says the final test came before it. The PDF text is read back by unpdf
 * (Mozilla's pdf.js), as docs/REFERENCES.md, § Reading back what Twinleaf prints suggests for a generated PDF.
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import { extractText, getDocumentProxy } from "unpdf";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers, items, links, users, type Item } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { certificateData, issueCertificate, recordCertificatePrint, renderCertificate } from "@/lib/certificates";
import { now } from "@/lib/clock";
import { packPair, shipCartons } from "@/lib/dispatch";
import { scannedContents } from "../fixtures/packing";
import { isoDay } from "@/lib/dispatch/dates";
import { createItem, fit, removeFrom } from "@/lib/genealogy/graph";

const db = () => getDb();
const BASE = "http://localhost:3000";
const names = new Map<string, { id: string; name: string }>();
let pair: Item;

/** The page text as unpdf extracts it, whitespace runs collapsed; every state fits one page. */
async function printed(copy: boolean): Promise<string> {
  const pdf = await renderCertificate(await certificateData(db(), pair.id, { baseUrl: BASE, copy }));
  const { text, totalPages } = await extractText(await getDocumentProxy(new Uint8Array(pdf)), { mergePages: true });
  expect(totalPages).toBe(1);
  return text.replace(/\s+/g, " ");
}

const longDate = (d: Date) => new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: process.env.TZ || "UTC" }).format(d);

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  for (const r of await db().select({ id: users.id, email: users.email, name: users.name }).from(users)) names.set(r.email.split("@")[0]!, r);
  // A pair that passed its final test in the history and waits to be packed.
  const [row] = await db().all<{ id: string }>(sql`
    SELECT p.id FROM items p
    WHERE p.kind = 'pair' AND p.state IN ('ready_to_pack', 'tested')
      AND (SELECT pass FROM final_tests t WHERE t.pair_id = p.id ORDER BY t.id DESC LIMIT 1) = 1
    ORDER BY p.identity LIMIT 1`);
  pair = (await db().select().from(items).where(eq(items.id, row!.id)))[0]!;
}, 90_000);

describe("the certificate at each state of the pair", () => {
  test("tested, not packed: tested and inspected, no packing line, nothing of a carton or of shipping", async () => {
    const certificate = await issueCertificate(db(), pair.id, names.get("packing")!.id);
    const text = await printed(false);
    expect(text).toContain(pair.identity);
    expect(text).toContain("Tested by:");
    expect(text).toContain("Inspected by:");
    expect(text).not.toContain("Packed by");
    expect(text).not.toMatch(/not recorded|carton|shipped|COPY/i);
    await recordCertificatePrint(db(), certificate.id, { actorId: names.get("packing")!.id, copy: false, station: "packing" });

    // A copy now says when the certificate was issued, and nothing yet of where the original is.
    const copy = await printed(true);
    expect(copy).toContain(`Reprint of the certificate issued on ${longDate(certificate.issuedAt)}.`);
    expect(copy).not.toMatch(/carton|shipped/i);
  });

  let carton = "";
  test("packed: the packer's name and date, and a copy says the original went into the carton", async () => {
    const r = await packPair(db(), await scannedContents(db(), pair.identity, "Rack C, shelf 1"), { id: names.get("packing")!.id });
    carton = r.carton.identity;
    const text = await printed(false);
    expect(text).toContain(`Packed by: ${names.get("packing")!.name}, ${longDate(now())}`);
    expect(text).not.toMatch(/shipped/i);
    const copy = await printed(true);
    expect(copy).toContain(`The original went into carton ${carton} with the pair.`);
    expect(copy).not.toMatch(/shipped/i);
  });

  test("shipped: a copy says the original shipped with the pair", async () => {
    const [dealer] = await db().select().from(dealers).where(eq(dealers.active, true)).limit(1);
    await shipCartons(db(), { dealerId: dealer!.id, cartons: [carton], shippedOn: isoDay(now()), carrier: "Fernway Freight", tracking: "CS-1" }, { id: names.get("packing")!.id });
    const copy = await printed(true);
    expect(copy).toContain("The original shipped with the pair.");
    expect(copy).toContain(`Packed by: ${names.get("packing")!.name}`);
    expect(copy).not.toContain("went into carton");
    expect(copy).not.toMatch(/repair/i);
  });

  test("after a repair: the copy shows the new part, what it replaced, and that the final test came before it", async () => {
    const [right] = await db().all<{ id: string }>(sql`SELECT child_id AS id FROM links WHERE parent_id = ${pair.id} AND position = 'R' AND ended_at IS NULL`);
    const speaker = (await db().select().from(items).where(eq(items.id, right!.id)))[0]!;
    const [held] = await db().select({ unit: items }).from(links).innerJoin(items, eq(items.id, links.childId)).where(and(eq(links.parentId, speaker.id), eq(links.position, "T"), isNull(links.endedAt)));
    const service = { actorId: names.get("service")!.id, station: "service" as const };
    const fitted = await db().transaction(async (tx) => {
      await removeFrom(tx, { parent: speaker, child: held!.unit }, { ...service, reason: "Tweeter silent." });
      const unit = await createItem(tx, { kind: "drive_unit", identity: "D-TW-26-99002-X", state: "in_stock", partType: "tweeter" }, service);
      await fit(tx, { parent: speaker, child: unit, position: "T" }, service);
      return unit;
    });
    const copy = await printed(true);
    const today = longDate(now());
    expect(copy).toContain(`This copy shows the pair as it is after the repair of ${today}.`);
    expect(copy).toContain(`The right speaker's tweeter (T): ${fitted.identity} in place of ${held!.unit.identity}, on ${today}.`);
    expect(copy).toContain(`Right replaced on ${today}`);
    expect(copy).toContain(`This test was made before the repair of ${today}.`);
    expect(copy).toContain("The original shipped with the pair.");
  });
});
