import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import path from "node:path";
import { toBuffer } from "bwip-js/node";
import * as cdigit from "cdigit";
import { and, eq, isNull, sql } from "drizzle-orm";
import { simpleParser } from "mailparser";
import { beforeAll, describe, expect, test } from "vitest";
import { extractText, getDocumentProxy } from "unpdf";
import { prepareZXingModule, readBarcodes, type ReaderOptions } from "zxing-wasm/reader";
import { getDb } from "@/db";
import { cartonLocations, cartonSsccs, certificates, dealers, events, items, links, models, outbox, packingItems, shipmentDetails, users, type Item } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import {
  cartonLabelData,
  cartonLabelPdf,
  DEFAULT_PACKING_LIST,
  ensurePackingLists,
  moveCarton,
  packingLines,
  packingList,
  packPair,
  type PackInput,
  readyToPack,
  shipCartons,
  shippedOn,
  verifyCertificate,
  waitingToShip,
} from "@/lib/dispatch";
import { isoDay } from "@/lib/dispatch/dates";
import { hitVerifyLimit, VERIFY_LIMIT } from "@/lib/dispatch/rate-limit";
import { PUBLIC_CERTIFICATE_FIELDS } from "@/lib/dispatch/verify";
import { startFakeSmtp } from "@/lib/mail/fake-smtp";
import { deliverDue } from "@/lib/mail/sender";
import { createMailTransport } from "@/lib/mail/transport";
import { formatSerial, parseSerial } from "@/lib/serials";
import { gs1CheckDigit } from "@/lib/serials/gs1";
import { scannedContents } from "../fixtures/packing";
import { failureText } from "./helpers";

const db = () => getDb();
let packer: { id: string };

// The oracle for the printed label is ZXing-C++ (zxing-wasm), an independent decoder, as in
// tests/unit/labels.test.ts; its .wasm is loaded from node_modules rather than a CDN.
beforeAll(async () => {
  // A year of the demo's history is enough here (see history.test.ts).
  await seedDemo(db(), { months: 6 });
  const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, "packing@demo.twinleaf.test"));
  packer = { id: u!.id };
  const wasm = readFileSync(createRequire(import.meta.url).resolve("zxing-wasm/reader/zxing_reader.wasm"));
  await prepareZXingModule({
    overrides: { wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer },
    fireImmediately: true,
  });
}, 120_000);

/** Row counts of the tables dispatch writes: a refused call must leave them all as they were. */
async function counts() {
  const [row] = await db().all<Record<string, number>>(sql`
    SELECT (SELECT count(*) FROM items) AS items, (SELECT count(*) FROM links) AS links, (SELECT count(*) FROM events) AS events,
           (SELECT count(*) FROM certificates) AS certificates, (SELECT count(*) FROM carton_locations) AS locations,
           (SELECT count(*) FROM shipment_details) AS shipments, (SELECT count(*) FROM outbox) AS outbox`);
  return row;
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const e = await p.then(
    () => null,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(AppError);
  return e as AppError;
}

async function pairsIn(state: string): Promise<Item[]> {
  return db().select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, state))).orderBy(items.identity);
}

/** The speakers a pair holds now, left first. */
async function speakerRows(pairId: string): Promise<Item[]> {
  const rows = await db().select({ item: items }).from(links).innerJoin(items, eq(items.id, links.childId)).where(and(eq(links.parentId, pairId), isNull(links.endedAt), eq(items.kind, "speaker"))).orderBy(links.position);
  return rows.map((r) => r.item);
}

async function fresh(identity: string): Promise<Item> {
  const [row] = await db().select().from(items).where(eq(items.identity, identity));
  return row!;
}

describe("packing lists", () => {
  test("the seeded models start with both speakers and the certificate", async () => {
    for (const m of await db().select().from(models)) {
      expect((await packingList(db(), m.id)).slice(0, 3)).toEqual(["Left speaker", "Right speaker", "Certificate"]);
    }
  });

  test("a model without rows gets the default list; ensurePackingLists writes it once", async () => {
    const id = "dispatch-test-model";
    await db().insert(models).values({
      id, code: "DT9", name: "Dispatch test", leavesPerFace: 1, minLeafLengthMm: 1, minLeafWidthMm: 1,
      pairResponseLimitDb: 1, responseMinHz: 100, responseMaxHz: 10_000,
      pairGtin: "09521234543213", // a valid GTIN-14 (docs/REFERENCES.md, § GS1)
      active: false,
    });
    expect(await packingList(db(), id)).toEqual([...DEFAULT_PACKING_LIST]);
    expect(await ensurePackingLists(db())).toBe(1);
    expect(await ensurePackingLists(db())).toBe(0);
    const rows = await db().select().from(packingItems).where(eq(packingItems.modelId, id)).orderBy(packingItems.position);
    expect(rows.map((r) => r.label)).toEqual([...DEFAULT_PACKING_LIST]);
    expect(rows.map((r) => r.position)).toEqual([1, 2, 3, 4, 5]);
  });

  test("a model's own rows follow the three fixed items, which are never listed twice", async () => {
    const id = "dispatch-test-model-2";
    await db().insert(models).values({
      id, code: "DT8", name: "Dispatch test two", leavesPerFace: 1, minLeafLengthMm: 1, minLeafWidthMm: 1,
      pairResponseLimitDb: 1, responseMinHz: 100, responseMaxHz: 10_000, pairGtin: "09521234543213", active: false,
    });
    await db().insert(packingItems).values([
      { modelId: id, position: 1, label: "Wall brackets (2)" },
      { modelId: id, position: 2, label: "certificate" },
      { modelId: id, position: 3, label: "Cleaning cloth" },
    ]);
    expect(await packingList(db(), id)).toEqual(["Left speaker", "Right speaker", "Certificate", "Wall brackets (2)", "Cleaning cloth"]);
  });
});

describe("packing a tested pair by scan", () => {
  let pair: Item;
  let other: Item;
  let good: PackInput;
  /** An invented GTIN-14 for the grilles' box, in the demo's prefix (check digit by gs1CheckDigit and cdigit below). */
  const GRILLES = "09527730009017";

  beforeAll(async () => {
    const tested = await pairsIn("ready_to_pack");
    expect(tested.length).toBeGreaterThan(1);
    pair = tested[0]!;
    other = (await pairsIn("shipped"))[0]!;
    // The grilles come boxed with a code: that line is scanned, the manual and certificate ticked.
    await db().update(packingItems).set({ code: GRILLES }).where(and(eq(packingItems.modelId, pair.modelId!), eq(packingItems.label, "Grilles (2)")));
    expect(cdigit.gtin.validate(GRILLES)).toBe(true);
    good = await scannedContents(db(), pair.identity, "Rack B, shelf 2");
  });

  test("the packing lines: both speakers by serial, the coded grilles by scan, the rest ticked", async () => {
    const lines = await packingLines(db(), pair);
    expect(lines.map((l) => [l.label, l.mode])).toEqual([
      ["Left speaker", "left"],
      ["Right speaker", "right"],
      ["Certificate", "tick"],
      ["Grilles (2)", "scan"],
      ["Owner's manual", "tick"],
    ]);
    expect(good.scans).toEqual([GRILLES]);
    expect(good.checked).toEqual(["Certificate", "Owner's manual"]);
  });

  test("the packers' home lists it as ready to pack", async () => {
    const ready = await readyToPack(db());
    const mine = ready.find((r) => r.identity === pair.identity);
    expect(mine).toMatchObject({ state: "ready_to_pack", modelCode: expect.any(String) });
    expect(mine!.testedAt).toBeInstanceOf(Date);
  });

  test("each wrong or missing scan is refused beside its own field, and nothing is written", async () => {
    const before = await counts();
    const [left, right] = [good.left, good.right];
    const [otherLeft] = await speakerRows(other.id);
    // A slipped check character: the last character of the left serial changed.
    const last = left.at(-1)!;
    const slipped = `${left.slice(0, -1)}${last === "A" ? "B" : "A"}`;
    const esc = (t: string) => t.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
    const cases: [string, Partial<PackInput>, string, RegExp][] = [
      ["a missing left serial", { left: "" }, "left", /^Scan the left speaker's serial\.$/],
      ["the left speaker scanned as right", { right: left }, "right", new RegExp(`^${esc(left)} is this pair's left speaker: scan it into the left speaker's box\\.$`)],
      ["another pair's speaker", { left: otherLeft!.identity }, "left", new RegExp(`belongs to pair ${other.identity}, not to ${pair.identity}`)],
      ["an unknown serial", { right: formatSerial({ kind: "speaker", code: "XX", year: 2026, seq: 99_999 }) }, "right", /is not a serial in the register/],
      ["a slipped check character", { left: slipped }, "left", new RegExp(`check character is wrong\\. Did you mean ${esc(left)}\\?`)],
      ["the pair's own serial in a speaker's box", { left: pair.identity }, "left", /is a pair, not a speaker/],
      ["the wrong accessory code", { scans: ["09527730009000"] }, "scan-0", /^09527730009000 is not the code of Grilles \(2\)/],
      ["a missing accessory scan", { scans: [] }, "scan-0", /^Scan the code of Grilles \(2\)\.$/],
      ["an unticked manual", { checked: ["Certificate"] }, "checked", /^Tick every item: Owner's manual is not ticked\.$/],
      ["a stray tick", { checked: [...good.checked, "A spare tweeter"] }, "checked", /"A spare tweeter" is not on the packing list/],
      ["an empty location", { location: "  " }, "location", /Say where the carton is stored/],
    ];
    for (const [what, change, field, message] of cases) {
      const e = await refusal(packPair(db(), { ...good, ...change }, packer));
      expect(e.status, what).toBe(400);
      expect(Object.keys(e.fieldErrors ?? {}), what).toEqual([field]);
      expect(e.fieldErrors![field]![0], what).toMatch(message);
    }
    // Both sides swapped: each box is answered for itself.
    const swapped = await refusal(packPair(db(), { ...good, left: right, right: left }, packer));
    expect(Object.keys(swapped.fieldErrors ?? {}).sort()).toEqual(["left", "right"]);
    expect(swapped.message).toBe("Nothing was packed: some fields need attention.");
    expect(await counts()).toEqual(before);
  });

  test("the GTIN on the grilles' box may come as printed or as a scanner sends it", async () => {
    for (const scan of [`(01)${GRILLES}`, `01${GRILLES}`, `]C101${GRILLES}`, GRILLES.slice(1)]) {
      // Refused for the missing location only: the scan itself was accepted.
      const e = await refusal(packPair(db(), { ...good, scans: [scan], location: "" }, packer));
      expect(Object.keys(e.fieldErrors ?? {}), scan).toEqual(["location"]);
    }
  });

  test("a pair that has not passed its final test is refused with a plain reason", async () => {
    const [building] = await pairsIn("awaiting_test");
    const e = await refusal(packPair(db(), { ...good, pairIdentity: building!.identity }, packer));
    expect(e.status).toBe(409);
    expect(e.message).toBe(`${building!.identity} is awaiting test: only a pair that has passed its final test can be packed.`);
    const e2 = await refusal(packPair(db(), { ...good, pairIdentity: "P-XX-26-00001-Z" }, packer));
    expect(e2.status).toBe(404);
  });

  test("a malformed GS1 company prefix setting stops packing with a clear message", async () => {
    const before = await counts();
    process.env.TWINLEAF_GS1_COMPANY_PREFIX = "95277";
    try {
      const e = await refusal(packPair(db(), good, packer));
      expect(e.status).toBe(409);
      expect(e.message).toMatch(/TWINLEAF_GS1_COMPANY_PREFIX is "95277": a GS1 company prefix is 7 to 10 digits/);
    } finally {
      delete process.env.TWINLEAF_GS1_COMPANY_PREFIX;
    }
    expect(await counts()).toEqual(before);
  });

  test("packed: a carton with its SSCC holds the pair at PAIR, the location is recorded, the certificate issued", async () => {
    const r = await packPair(db(), { ...good, pairIdentity: pair.identity.toLowerCase(), left: good.left.toLowerCase(), location: "  Rack B,   shelf 2 " }, packer);
    const [model] = await db().select().from(models).where(eq(models.id, pair.modelId!));

    expect(parseSerial(r.carton.identity)).toMatchObject({ kind: "carton", code: model!.code, valid: true });
    expect(r.carton).toMatchObject({ kind: "carton", state: "packed", modelId: model!.id });
    expect(r.carton.attrs).toMatchObject({ gtin: model!.pairGtin, packedOn: expect.stringMatching(/^\d{4}-\d{2}-\d{2}$/) });
    // SSCC: extension 0, the demo prefix, the next serial reference, and a check digit two independent implementations agree on.
    expect(r.sscc).toMatch(/^09527730\d{9}\d$/);
    expect(cdigit.gtin.validate(r.sscc)).toBe(true); // cdigit's GTIN algorithm is the GS1 mod-10 of any length
    const [stored] = await db().select().from(cartonSsccs).where(eq(cartonSsccs.cartonId, r.carton.id));
    expect(stored).toMatchObject({ sscc: r.sscc, extension: 0, companyPrefix: "9527730" });
    const [top] = await db().all<{ max: number }>(sql`SELECT max(serial_reference) AS max FROM carton_ssccs`);
    expect(stored!.serialReference).toBe(Number(top!.max));
    // Append-only: the row neither changes nor goes.
    expect(await failureText(() => db().run(sql`UPDATE carton_ssccs SET sscc = '000000000000000000' WHERE carton_id = ${r.carton.id}`))).toMatch(/never changes/);
    expect(await failureText(() => db().run(sql`DELETE FROM carton_ssccs WHERE carton_id = ${r.carton.id}`))).toMatch(/never deleted/);

    const held = await db().select().from(links).where(and(eq(links.parentId, r.carton.id), isNull(links.endedAt)));
    expect(held.map((l) => [l.childId, l.position])).toEqual([[pair.id, "PAIR"]]);

    const locs = await db().select().from(cartonLocations).where(eq(cartonLocations.cartonId, r.carton.id));
    expect(locs.map((l) => l.location)).toEqual(["Rack B, shelf 2"]);

    expect((await fresh(pair.identity)).state).toBe("packed");
    // Its speakers share its fate: each moved to packed by its own state-change event.
    const speakers = await speakerRows(pair.id);
    expect(speakers.map((s) => s.state)).toEqual(["packed", "packed"]);
    for (const s of speakers) {
      const [moved] = await db().select().from(events).where(and(eq(events.type, "item.state_changed"), eq(events.subjectId, s.id), sql`json_extract(${events.data}, '$.to') = 'packed'`));
      expect(moved!.data).toMatchObject({ from: "built", to: "packed", pair: pair.identity, carton: r.carton.identity });
    }
    const [packed] = await db().select().from(events).where(and(eq(events.type, "pair.packed"), eq(events.subjectId, pair.id)));
    expect(packed!.data).toMatchObject({ carton: r.carton.identity, sscc: r.sscc, location: "Rack B, shelf 2", accessories: { "Grilles (2)": GRILLES } });
    expect(packed!.actorId).toBe(packer.id);

    const [cert] = await db().select().from(certificates).where(eq(certificates.pairId, pair.id));
    expect(cert!.id).toBe(r.certificateId);

    expect((await waitingToShip(db())).find((w) => w.carton === r.carton.identity)).toMatchObject({ pair: pair.identity, location: "Rack B, shelf 2", sscc: r.sscc });
  });

  test("packing it again is refused", async () => {
    const e = await refusal(packPair(db(), good, packer));
    expect(e.status).toBe(409);
    expect(e.message).toMatch(/is already packed, in carton K-/);
  });

  test("moving the carton appends a location; the same place again is refused", async () => {
    const [carton] = await db().select().from(links).where(and(eq(links.childId, pair.id), isNull(links.endedAt)));
    const identity = carton!.parentIdentity!;
    await moveCarton(db(), { carton: identity, location: "Bay 3" }, packer);
    const locs = await db().select().from(cartonLocations).where(eq(cartonLocations.cartonId, carton!.parentId)).orderBy(cartonLocations.id);
    expect(locs.map((l) => l.location)).toEqual(["Rack B, shelf 2", "Bay 3"]);
    const e = await refusal(moveCarton(db(), { carton: identity, location: "bay 3" }, packer));
    expect(e.message).toMatch(/already at Bay 3/);
    await moveCarton(db(), { carton: identity, location: "Rack B, shelf 2" }, packer);
  });
});

// ---- the carton label, read back by an independent decoder -------------------------------------

const hasPdftoppm = spawnSync("pdftoppm", ["-v"]).status === 0;

async function decodePdf(pdf: Buffer, opts: ReaderOptions) {
  const dir = mkdtempSync(path.join(tmpdir(), "twinleaf-carton-"));
  try {
    const file = path.join(dir, "label.pdf");
    writeFileSync(file, pdf);
    execFileSync("pdftoppm", ["-png", "-r", "300", file, path.join(dir, "page")]);
    const pngs = readdirSync(dir).filter((f) => f.endsWith(".png")).sort();
    return Promise.all(pngs.map((f) => readBarcodes(new Uint8Array(readFileSync(path.join(dir, f))), { tryHarder: true, ...opts })));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** One page object with its MediaBox (react-pdf writes page dictionaries uncompressed). */
function pageBoxes(pdf: Buffer): number[][] {
  const objects = pdf.toString("latin1").match(/\d+ \d+ obj\b.*?\bendobj/gs) ?? [];
  return objects
    .filter((o) => /\/Type\s*\/Page(?![A-Za-z])/.test(o))
    .map((o) => /\/MediaBox\s*\[\s*([-\d.\s]+)\]/.exec(o)![1]!.trim().split(/\s+/).map(Number));
}

/** The page text as unpdf (pdf.js) extracts it, whitespace runs collapsed (docs/REFERENCES.md, § Independent libraries). */
async function pdfText(pdf: Buffer): Promise<string> {
  const { text } = await extractText(await getDocumentProxy(new Uint8Array(pdf)), { mergePages: true });
  return text.replace(/\s+/g, " ");
}

describe.skipIf(!hasPdftoppm)("the carton label decodes to its SSCC and contents (poppler + zxing-wasm)", () => {
  let carton: string;
  let pair: string;
  let gtin: string;
  let sscc: string;

  beforeAll(async () => {
    const packed = await db().select().from(events).where(eq(events.type, "pair.packed")).orderBy(events.id);
    const data = packed.at(-1)!.data as { identity: string; carton: string; sscc: string };
    carton = data.carton;
    pair = data.identity;
    sscc = data.sscc;
    const c = await fresh(carton);
    gtin = c.attrs.gtin as string;
  });

  test.each([203, 300, 600])("at %i dpi: one 100 × 150 mm page with the contents' (01)(21) and the SSCC's (00) in GS1-128, read as printed", async (printerDpi) => {
    const pdf = await cartonLabelPdf(db(), carton, { printerDpi });
    const boxes = pageBoxes(pdf);
    expect(boxes).toHaveLength(1);
    expect(boxes[0]![2]).toBeCloseTo((100 * 72) / 25.4, 1);
    expect(boxes[0]![3]).toBeCloseTo((150 * 72) / 25.4, 1);

    const [hri] = await decodePdf(pdf, { textMode: "HRI" });
    // ZXing's HRI text mode gives the AI form; ]C1 is GS1-128 (FNC1 first), ISO/IEC 15424.
    expect(hri!.map((b) => b.text).sort()).toEqual([`(00)${sscc}`, `(01)${gtin}(21)${pair}`]);
    for (const b of hri!) {
      expect(b.symbologyIdentifier).toBe("]C1");
      expect(b.contentType).toBe("GS1");
    }
    // The SSCC is the bottom barcode (GS1 logistic label).
    const bottom = [...hri!].sort((a, b) => b.position.topLeft.y - a.position.topLeft.y)[0]!;
    expect(bottom.text).toBe(`(00)${sscc}`);
    // Plain mode: the element strings as transmitted, no group separator ((21) is last).
    const [plain] = await decodePdf(pdf, { textMode: "Plain" });
    expect(plain!.map((b) => b.text).sort()).toEqual([`00${sscc}`, `01${gtin}21${pair}`]);

    // Exactly as printed: the human-readable lines under the bars say the same.
    const text = await pdfText(pdf);
    expect(text).toContain(`(01)${gtin}(21)${pair}`);
    expect(text).toContain(`(00) ${sscc[0]} 9527730 ${sscc.slice(8, 17)} ${sscc[17]}`);
    expect(text).toMatch(/FROM Twinleaf Demonstration Workshop/);
    expect(text).toMatch(/HEAVY/);
  });

  test("the decoded keys' check digits are right by the project's gs1CheckDigit and by cdigit, and bwip-js accepts the string", async () => {
    const [page] = await decodePdf(await cartonLabelPdf(db(), carton), { textMode: "HRI" });
    const hit = page!.find((b) => b.text.startsWith("(01)"))!;
    const decodedGtin = /^\(01\)(\d{14})\(21\)/.exec(hit.text)![1]!;
    // GS1 mod-10 (docs/REFERENCES.md, § GS1): the project's implementation and an independent one agree.
    expect(gs1CheckDigit(decodedGtin.slice(0, 13))).toBe(Number(decodedGtin[13]));
    expect(cdigit.gtin.validate(decodedGtin)).toBe(true);
    expect(cdigit.gtin.compute("629104150021")).toBe("3"); // GS1's own worked example pins the oracle
    const decodedSscc = page!.find((b) => b.text.startsWith("(00)"))!.text.slice(4);
    expect(cdigit.gtin.validate(decodedSscc)).toBe(true);
    // bwip-js lints GS1 data and throws on a bad (01) check digit (docs/REFERENCES.md, § Independent libraries): it takes ours…
    await expect(toBuffer({ bcid: "gs1-128", text: hit.text })).resolves.toBeInstanceOf(Buffer);
    // …and refuses the same string with the check digit off by one, so the check is not vacuous.
    const wrong = hit.text.replace(`(01)${decodedGtin}`, `(01)${decodedGtin.slice(0, 13)}${(Number(decodedGtin[13]) + 1) % 10}`);
    await expect(toBuffer({ bcid: "gs1-128", text: wrong })).rejects.toThrow(/checksum/i);
  });

  test("the label's data names the model, finish, both speakers and the SSCC; an unknown carton is a 404", async () => {
    const data = await cartonLabelData(db(), carton);
    expect(data.pair).toBe(pair);
    expect(data.left).toMatch(/^S-/);
    expect(data.right).toMatch(/^S-/);
    expect(data.element.hri).toBe(`(01)${gtin}(21)${pair}`);
    expect(data.sscc).toEqual({ value: sscc, prefixLength: 7 });
    expect(data.customer).toBeNull(); // not shipped yet
    const e = await refusal(cartonLabelPdf(db(), "K-XX-26-00001-Z"));
    expect(e.status).toBe(404);
  });
});

// ---- shipping ----------------------------------------------------------------------------------

describe("shipping two cartons to a dealer", () => {
  let dealer: typeof dealers.$inferSelect;
  let chosen: { carton: string; pair: string | null }[];
  let shipment: Item;
  const today = isoDay(new Date());

  beforeAll(async () => {
    dealer = (await db().select().from(dealers).where(eq(dealers.code, "MLR")))[0]!;
    const waiting = await waitingToShip(db());
    // Ours and one packed in the demo history (each had its certificate issued when packed).
    const ours = waiting.find((w) => w.location === "Rack B, shelf 2")!;
    const theirs = waiting.find((w) => w !== ours)!;
    chosen = [ours, theirs];
  });

  test("bad input is refused with a message per field and writes nothing", async () => {
    const before = await counts();
    const cartons = chosen.map((c) => c.carton);
    const future = isoDay(new Date(Date.now() + 3 * 86_400_000));
    const e1 = await refusal(shipCartons(db(), { dealerId: dealer.id, cartons, shippedOn: future, carrier: "Fernway Freight", tracking: "ABC123" }, packer));
    expect(e1.fieldErrors?.shippedOn?.[0]).toMatch(/in the future/);
    const e2 = await refusal(shipCartons(db(), { dealerId: dealer.id, cartons, shippedOn: today, carrier: " ", tracking: "" }, packer));
    expect(Object.keys(e2.fieldErrors ?? {}).sort()).toEqual(["carrier", "tracking"]);
    const e3 = await refusal(shipCartons(db(), { dealerId: dealer.id, cartons: [...cartons, "K-XX-26-00001-Z"], shippedOn: today, carrier: "Fernway Freight", tracking: "ABC123" }, packer));
    expect(e3.fieldErrors?.cartons).toEqual(["K-XX-26-00001-Z is not a carton in the register."]);
    const [tested] = await pairsIn("ready_to_pack");
    const e4 = await refusal(shipCartons(db(), { dealerId: dealer.id, cartons: [tested?.identity ?? "P-XX-26-00001-Z"], shippedOn: today, carrier: "Fernway Freight", tracking: "ABC123" }, packer));
    expect(e4.fieldErrors?.cartons?.[0]).toMatch(/is not a carton in the register/);
    const e5 = await refusal(shipCartons(db(), { dealerId: "no-such-dealer", cartons, shippedOn: "2026-02-30", carrier: "Fernway Freight", tracking: "ABC123" }, packer));
    expect(Object.keys(e5.fieldErrors ?? {}).sort()).toEqual(["dealerId", "shippedOn"]);
    expect(await counts()).toEqual(before);
  });

  test("one shipment holds both cartons; cartons and pairs are shipped; ONE e-mail to the dealer with two certificates", async () => {
    const r = await shipCartons(db(), { dealerId: dealer.id, cartons: chosen.map((c) => c.carton), shippedOn: today, carrier: "Fernway Freight", tracking: "ABC123" }, packer);
    shipment = r.shipment;
    expect(parseSerial(r.shipment.identity)).toMatchObject({ kind: "shipment", code: "MLR", valid: true });
    expect(r.shipment).toMatchObject({ kind: "shipment", state: "shipped", dealerId: dealer.id });

    const held = await db().select().from(links).where(and(eq(links.parentId, r.shipment.id), isNull(links.endedAt))).orderBy(links.position);
    expect(held.map((l) => l.position)).toEqual(["1", "2"]);
    for (const c of chosen) {
      expect((await fresh(c.carton)).state).toBe("shipped");
      const pairRow = await fresh(c.pair!);
      expect(pairRow.state).toBe("shipped");
      // A shipped pair's speakers read shipped too.
      expect((await speakerRows(pairRow.id)).map((s) => s.state)).toEqual(["shipped", "shipped"]);
    }
    // "Shipped today" lists both cartons of the shipment.
    expect((await shippedOn(db(), today)).filter((x) => x.shipment === r.shipment.identity).map((x) => x.carton)).toEqual(chosen.map((c) => c.carton));
    const [details] = await db().select().from(shipmentDetails).where(eq(shipmentDetails.itemId, r.shipment.id));
    expect(details).toMatchObject({ dealerId: dealer.id, shippedOn: today, carrier: "Fernway Freight", tracking: "ABC123" });

    const mails = await db().select().from(outbox).where(eq(outbox.id, r.mailId!));
    expect(mails).toHaveLength(1);
    const mail = mails[0]!;
    expect(mail.to).toBe(dealer.email);
    expect(mail.subject).toBe("Shipped: 2 matched pairs, tracking ABC123");
    for (const c of chosen) expect(mail.text).toContain(c.pair!);
    expect(mail.text).toContain("ABC123");
    expect(mail.eventId).toBe(details!.eventId);
    const certs = await db().select().from(certificates);
    expect(mail.attachments).toHaveLength(3);
    expect(mail.attachments[0]).toEqual({ kind: "delivery_note", shipmentId: r.shipment.id, filename: `delivery-note-${r.shipment.identity}.pdf` });
    for (const [i, c] of chosen.entries()) {
      const pairRow = await fresh(c.pair!);
      const cert = certs.find((x) => x.pairId === pairRow.id)!;
      expect(mail.attachments[i + 1]).toEqual({ kind: "certificate", certificateId: cert.id, filename: `certificate-${c.pair}.pdf` });
    }
    // Exactly one message for this shipment.
    expect(await db().select().from(outbox).where(eq(outbox.eventId, details!.eventId))).toHaveLength(1);
  });

  test("a shipped carton cannot ship again", async () => {
    const before = await counts();
    const e = await refusal(shipCartons(db(), { dealerId: dealer.id, cartons: [chosen[0]!.carton], shippedOn: today, carrier: "Fernway Freight", tracking: "XYZ9" }, packer));
    expect(e.fieldErrors?.cartons).toEqual([`${chosen[0]!.carton} has already shipped (${shipment.identity}).`]);
    expect(await counts()).toEqual(before);
    expect(await waitingToShip(db())).not.toContainEqual(expect.objectContaining({ carton: chosen[0]!.carton }));
  });

  test("the sender renders each certificate at send time; through SMTP the message arrives with both PDFs", async () => {
    const dir = mkdtempSync(path.join(process.env.TWINLEAF_TEST_DIR!, "mailbox-"));
    const smtp = await startFakeSmtp({ port: 0, dir });
    try {
      const transport = createMailTransport({ smtp: { host: "127.0.0.1", port: smtp.port, secure: false }, from: "Twinleaf <no-reply@twinleaf.test>", mailboxDir: dir });
      const result = await deliverDue(db(), transport, { batch: 1000, baseUrl: "https://twinleaf.example" });
      transport.close();
      expect(result.failed).toBe(0);
      const files = readdirSync(dir).filter((f) => f.endsWith(".eml"));
      const parsed = await Promise.all(files.map(async (f) => simpleParser(readFileSync(path.join(dir, f)))));
      const ours = parsed.filter((m) => m.subject === "Shipped: 2 matched pairs, tracking ABC123");
      expect(ours).toHaveLength(1);
      const mail = ours[0]!;
      expect(mail.attachments.map((a) => [a.filename, a.contentType])).toEqual([
        [`delivery-note-${shipment.identity}.pdf`, "application/pdf"],
        ...chosen.map((c) => [`certificate-${c.pair}.pdf`, "application/pdf"]),
      ]);
      for (const a of mail.attachments) expect(a.content.subarray(0, 5).toString()).toBe("%PDF-");
      expect(mail.text).toContain("tracking number ABC123");

      // The delivery note read back with unpdf (docs/REFERENCES.md, § Independent libraries): the
      // dealer's address, each carton's SSCC, pair and speakers, the carrier and the totals.
      const note = await pdfText(mail.attachments[0]!.content);
      expect(note).toContain("Delivery note");
      expect(note).toContain(dealer.name);
      for (const line of dealer.address.split("\n")) expect(note).toContain(line.trim());
      expect(note).toContain(`${dealer.postcode} ${dealer.city}`);
      expect(note).toContain("Fernway Freight");
      expect(note).toContain("ABC123");
      const ssccs = await db().select().from(cartonSsccs);
      for (const c of chosen) {
        const cartonRow = await fresh(c.carton);
        const sscc = ssccs.find((x) => x.cartonId === cartonRow.id)!.sscc;
        expect(note).toContain(sscc);
        expect(note).toContain(c.pair!);
        for (const s of await speakerRows((await fresh(c.pair!)).id)) expect(note).toContain(s.identity);
      }
      expect(note).toContain("Total: 2 cartons, 2 matched pairs, 4 speakers");
    } finally {
      await smtp.close();
    }
  }, 60_000);
});

// ---- the public check --------------------------------------------------------------------------

describe("verifyCertificate", () => {
  test("answers the public fields only, for the code on the certificate", async () => {
    const [cert] = await db()
      .select({ code: certificates.code, pairId: certificates.pairId, issuedAt: certificates.issuedAt })
      .from(certificates)
      .orderBy(certificates.issuedAt)
      .limit(1);
    const found = await verifyCertificate(db(), cert!.code);
    expect(found).not.toBeNull();
    // Nothing beyond the public keys: no names, dealer, owner, ids or states.
    expect(Object.keys(found!).sort()).toEqual([...PUBLIC_CERTIFICATE_FIELDS].sort());
    const [pair] = await db().select().from(items).where(eq(items.id, cert!.pairId));
    const [model] = await db().select().from(models).where(eq(models.id, pair!.modelId!));
    expect(found!.pairSerial).toBe(pair!.identity);
    expect(found!.model).toBe(`${model!.code} ${model!.name}`);
    expect(found!.leftSerial).toMatch(/^S-/);
    expect(found!.rightSerial).toMatch(/^S-/);
    expect(found!.buildMonth).toMatch(/^(January|February|March|April|May|June|July|August|September|October|November|December) 20\d\d$/);
    expect(found!.issuedOn.getTime()).toBe(cert!.issuedAt.getTime());
    // Capitals typed from paper read the same.
    expect(await verifyCertificate(db(), cert!.code.toUpperCase())).toEqual(found);
    const text = JSON.stringify(found);
    expect(text).not.toContain(pair!.id);
    expect(text).not.toMatch(/@|demo|dealer/i);
  });

  test.each([["a well-formed code nobody was given", "a".repeat(26)], ["malformed", "../../etc/passwd"], ["empty", ""], ["too short", "abc"]])("%s → null", async (_what, code) => {
    expect(await verifyCertificate(db(), code)).toBeNull();
  });
});

describe("the public page's limit, kept in the database", () => {
  test("allows 30 per 10 minutes per address, then refuses until the oldest check leaves the window", async () => {
    expect(VERIFY_LIMIT).toEqual({ windowMs: 600_000, max: 30 });
    const t0 = new Date("2025-05-05T09:00:00.000Z").getTime();
    const at = (ms: number) => new Date(t0 + ms);
    for (let i = 0; i < 30; i++) expect(await hitVerifyLimit(db(), "203.0.113.9", at(i))).toEqual({ ok: true });
    // Oldest at t0, window 600 s: at t0 + 31 ms, 599.969 s are left, rounded up.
    expect(await hitVerifyLimit(db(), "203.0.113.9", at(31))).toEqual({ ok: false, retryAfterSeconds: 600 });
    expect(await hitVerifyLimit(db(), "198.51.100.7", at(31))).toEqual({ ok: true }); // another address is not affected
    expect(await hitVerifyLimit(db(), "203.0.113.9", at(600_000))).toEqual({ ok: true });
  });
});
