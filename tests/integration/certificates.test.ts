/**
 * The pair certificate: its data read from the seeded register, its PDF read back by independent
 * tools, issuing it once, and the print route that records every print and marks reprints COPY.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, eq, sql } from "drizzle-orm";
import { extractText, getDocumentProxy } from "unpdf";
import { beforeAll, describe, expect, test } from "vitest";
import { prepareZXingModule, readBarcodes } from "zxing-wasm/reader";
import { getDb } from "@/db";
import { certificates, events, finalTests, items, responses } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import { base32, CERTIFICATE_CODE_PATTERN } from "@/lib/certificates/code";
import { certificateData, certificateOf, formatDb, issueCertificate, renderCertificate, type CertificateData } from "@/lib/certificates";
import { appendEvent } from "@/lib/events/queries";
import { releaseReserve } from "@/lib/veneer/flitches";
import { failureText } from "./helpers";
import { request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

const { POST: certificateRoute } = await import("@/app/api/v1/pairs/[identity]/certificate/route");
const { GET: printRoute } = await import("@/app/api/v1/pairs/[identity]/certificate/prints/[printId]/route");

const db = () => getDb();
const BASE = "http://localhost:3000";
const users = new Map<string, { id: string; name: string }>();

interface PairRow {
  id: string;
  identity: string;
  state: string;
  model: string;
  finish_kind: string;
}

async function pairs(where = sql`1 = 1`) {
  return db().all<PairRow>(sql`
    SELECT p.id, p.identity, p.state, m.name AS model, f.kind AS finish_kind
    FROM items p JOIN models m ON m.id = p.model_id JOIN finishes f ON f.id = p.finish_id
    WHERE p.kind = 'pair' AND ${where} ORDER BY p.identity`);
}

beforeAll(async () => {
  // The demo with a year of history, written through the register's own functions (see history.test.ts).
  await seedDemo(db(), { months: 12 });
  const rows = await db().all<{ id: string; email: string; name: string }>(sql`SELECT id, email, name FROM users`);
  for (const r of rows) users.set(r.email.split("@")[0]!, { id: r.id, name: r.name });

  // ZXing-C++ as WebAssembly; its .wasm normally comes from a CDN, so load the copy in node_modules.
  const wasm = readFileSync(createRequire(import.meta.url).resolve("zxing-wasm/reader/zxing_reader.wasm"));
  await prepareZXingModule({
    overrides: { wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer },
    fireImmediately: true,
  });
}, 90_000);

// ---- reading the PDF back with independent tools ---------------------------------------------

/** The page text as unpdf (Mozilla's pdf.js) extracts it, whitespace runs collapsed. */
async function pdfText(pdf: Buffer): Promise<{ text: string; pages: number }> {
  const doc = await getDocumentProxy(new Uint8Array(pdf));
  const { text, totalPages } = await extractText(doc, { mergePages: true });
  return { text: text.replace(/\s+/g, " "), pages: totalPages };
}

const hasPdftoppm = spawnSync("pdftoppm", ["-v"]).status === 0;

/** The QR codes found on the page as poppler rasterises it at 200 dpi, decoded by zxing-wasm. */
async function qrCodesOnPage(pdf: Buffer): Promise<string[]> {
  const dir = mkdtempSync(path.join(tmpdir(), "twinleaf-certificate-"));
  try {
    const file = path.join(dir, "certificate.pdf");
    writeFileSync(file, pdf);
    execFileSync("pdftoppm", ["-png", "-r", "200", "-f", "1", "-l", "1", file, path.join(dir, "page")]);
    const png = readdirSync(dir).find((f) => f.endsWith(".png"))!;
    const hits = await readBarcodes(new Uint8Array(readFileSync(path.join(dir, png))), { formats: ["QRCode"], tryHarder: true });
    return hits.map((h) => h.text);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

// ---- what the register says, read directly -----------------------------------------------------

async function speakersOf(pairId: string) {
  const rows = await db().all<{ position: string; identity: string }>(sql`
    SELECT l.position, i.identity FROM links l JOIN items i ON i.id = l.child_id
    WHERE l.parent_id = ${pairId} AND l.ended_at IS NULL AND l.position IN ('L', 'R')`);
  return Object.fromEntries(rows.map((r) => [r.position, r.identity])) as Record<"L" | "R", string>;
}

/** Leaf numbers of each face now, read from the links into the cabinets (not from leaf_allocations). */
async function faceLeavesOf(pairId: string) {
  const rows = await db().all<{ side: string; position: string; seq: number }>(sql`
    SELECT spk.position AS side, lf.position, v.seq
    FROM links spk
    JOIN links cab ON cab.parent_id = spk.child_id AND cab.position = 'CAB' AND cab.ended_at IS NULL
    JOIN links lf ON lf.parent_id = cab.child_id AND lf.ended_at IS NULL
    JOIN veneer_leaves v ON v.item_id = lf.child_id
    WHERE spk.parent_id = ${pairId} AND spk.ended_at IS NULL
    ORDER BY spk.position, CAST(substr(lf.position, 2) AS INTEGER)`);
  return { L: rows.filter((r) => r.side === "L").map((r) => Number(r.seq)), R: rows.filter((r) => r.side === "R").map((r) => Number(r.seq)) };
}

let shipped: PairRow;
let data: CertificateData;
let original: Buffer;

describe("certificateData of a shipped veneered pair", () => {
  beforeAll(async () => {
    const candidates = await pairs(sql`p.state = 'shipped' AND f.kind = 'veneer'`);
    shipped = candidates.find((p) => p.identity.startsWith("P-SL3")) ?? candidates[0]!;
    data = await certificateData(db(), shipped.id, { baseUrl: BASE, copy: false });
  });

  test("holds both speakers, the parts at every position of the model and the crossovers", async () => {
    const speakers = await speakersOf(shipped.id);
    expect(data.pair.identity).toBe(shipped.identity);
    expect(data.model.name).toBe(shipped.model);
    expect(data.speakers.L.identity).toBe(speakers.L);
    expect(data.speakers.R.identity).toBe(speakers.R);
    expect(data.speakers.L.identity).not.toBe(data.speakers.R.identity);

    const modelPositions = await db().all<{ position: string }>(sql`
      SELECT mp.position FROM model_positions mp JOIN items p ON p.model_id = mp.model_id WHERE p.id = ${shipped.id}`);
    expect(data.positions.map((r) => r.position).sort()).toEqual([...modelPositions.map((r) => r.position), "XO"].sort());
    for (const row of data.positions) {
      // Each serial is the part held at that position by that speaker now.
      for (const [side, serial] of [["L", row.left], ["R", row.right]] as const) {
        const [held] = await db().all<{ identity: string }>(sql`
          SELECT c.identity FROM links l JOIN items c ON c.id = l.child_id JOIN items s ON s.id = l.parent_id
          WHERE s.identity = ${speakers[side]} AND l.position = ${row.position} AND l.ended_at IS NULL`);
        expect(serial, `${side} ${row.position}`).toBe(held!.identity);
      }
      // Every position stands on the matched set of the two parts there (history.test.ts recomputes the figures).
      expect(row.match, row.position).toMatchObject({ setCode: expect.any(String) });
      expect(row.match!.maxDiffDb).toBeLessThanOrEqual(row.match!.limitDb);
    }
  });

  test("holds the leaf numbers of each face: the left ones as cut, the right ones turned", async () => {
    const faces = await faceLeavesOf(shipped.id);
    expect(faces.L.length).toBeGreaterThan(0);
    expect(data.veneer!.faces.L.leaves.map((l) => l.leafNo)).toEqual(faces.L);
    expect(data.veneer!.faces.R.leaves.map((l) => l.leafNo)).toEqual(faces.R);
    expect(data.veneer!.faces.L.leaves.every((l) => l.orientation === "as_cut")).toBe(true);
    expect(data.veneer!.faces.R.leaves.every((l) => l.orientation === "turned")).toBe(true);
    expect(data.veneer!.flitches).toHaveLength(1);
    expect(data.veneer!.faces.L.leaves[0]!.identity.startsWith(`${data.veneer!.flitches[0]}/`)).toBe(true);
  });

  test("holds the final test with both responses, and who tested, inspected and packed the pair", () => {
    expect(data.finalTest).toMatchObject({ pass: true, limitDb: 1 });
    expect(data.finalTest!.left.length).toBeGreaterThan(10);
    expect(data.finalTest!.right.length).toBe(data.finalTest!.left.length);
    expect(data.signatures.map((s) => [s.label, s.name])).toEqual([
      ["Tested by", users.get("lab")!.name],
      ["Inspected by", users.get("assembly")!.name],
      ["Packed by", users.get("packing")!.name],
    ]);
    expect(data.signatures[0]!.meaning).toMatch(/^measured both speakers and found them within ±1 dB of each other from \d+ Hz to [\d.]+ kHz$/);
    expect(data.verifyUrl).toMatch(new RegExp(`^${BASE}/verify/[a-z2-7]{26}$`));
  });
});

describe("renderCertificate, read back by independent tools", () => {
  beforeAll(async () => {
    original = await renderCertificate(data);
  });

  // docs/REFERENCES.md, § Independent libraries: unpdf (pdf.js) extracts a generated PDF's text.
  test("unpdf finds the pair serial, both speaker serials, the model and the leaf numbers, on one page", async () => {
    const { text, pages } = await pdfText(original);
    expect(pages).toBe(1);
    expect(text).toContain("Certificate of a matched pair");
    expect(text).toContain(shipped.identity);
    expect(text).toContain(data.speakers.L.identity);
    expect(text).toContain(data.speakers.R.identity);
    expect(text).toContain(shipped.model);
    const faces = await faceLeavesOf(shipped.id);
    expect(text).toContain(`Left face (as cut): leaves ${faces.L.join(", ")}`);
    expect(text).toContain(`Right face (turned over): leaves ${faces.R.join(", ")}`);
    expect(text).toContain(data.veneer!.flitches[0]!);
    for (const row of data.positions) expect(text).toContain(row.left!);
    expect(text).toMatch(/Largest difference \d\.\d+ dB at [\d.]+ k?Hz; limit 1 dB: passed/);
    expect(text).not.toContain("COPY");
  });

  // docs/REFERENCES.md, § Independent libraries: zxing-wasm decodes QR from a PNG. The page
  // is rasterised by poppler (pdftoppm, installed by .ci/run), so what is checked is what prints.
  test.skipIf(!hasPdftoppm)("the QR code on the rasterised page decodes to exactly the verify URL", async () => {
    expect(await qrCodesOnPage(original)).toEqual([data.verifyUrl]);
  });

  test("a copy is marked COPY and names the date of the original", async () => {
    const copy = await renderCertificate({ ...data, copy: true });
    const { text } = await pdfText(copy);
    expect(text).toContain("COPY");
    const issued = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: process.env.TZ || "UTC" }).format(data.issuedAt);
    expect(text).toContain(`Reprint of the certificate issued on ${issued}`);
  });

  test("a lacquered pair has no veneer section, and still fits one page", async () => {
    const [lacquered] = await pairs(sql`p.state = 'shipped' AND f.kind = 'lacquer'`);
    const d = await certificateData(db(), lacquered!.id, { baseUrl: BASE, copy: false });
    expect(d.veneer).toBeNull();
    const { text, pages } = await pdfText(await renderCertificate(d));
    expect(pages).toBe(1);
    expect(text).toContain(lacquered!.identity);
    expect(text).not.toContain("Veneer origin");
  });
});

describe("what the register adds to the certificate later", () => {
  test("a matched set prints its figure at its position", async () => {
    const [other] = (await pairs(sql`p.state = 'shipped' AND p.id <> ${shipped.id}`)).slice(-1);
    const d = await certificateData(db(), other!.id, { baseUrl: BASE, copy: false });
    const t = d.positions.find((r) => r.position === "T")!;
    // The set the lab reserved for these two tweeters, as the register holds it.
    const [set] = await db().all<{ code: string; max_diff_db: number; limit_db: number }>(sql`
      SELECT s.code, s.max_diff_db, s.limit_db FROM matched_sets s
      JOIN set_members l ON l.set_id = s.id JOIN items li ON li.id = l.item_id AND li.identity = ${t.left}
      JOIN set_members r ON r.set_id = s.id JOIN items ri ON ri.id = r.item_id AND ri.identity = ${t.right}`);
    expect(t.match).toEqual({ setCode: set!.code, maxDiffDb: set!.max_diff_db, limitDb: set!.limit_db });
    const { text } = await pdfText(await renderCertificate(d));
    expect(text).toContain(`${formatDb(set!.max_diff_db)} dB at most, limit ${formatDb(set!.limit_db)} dB`);
  });

  test("a face re-veneered from the pair's reserve shows the replacement leaf, not the scrapped one", async () => {
    const [reserve] = await db().all<{ leaf_id: string; pair_id: string; seq: number }>(sql`
      SELECT a.leaf_id, a.pair_id, v.seq FROM leaf_allocations a JOIN veneer_leaves v ON v.item_id = a.leaf_id
      JOIN items p ON p.id = a.pair_id
      WHERE a.role = 'reserve' AND a.ended_at IS NULL AND p.state = 'shipped' LIMIT 1`);
    const before = await certificateData(db(), reserve!.pair_id, { baseUrl: BASE, copy: false });
    const [cabinet] = await db().select().from(items).where(eq(items.identity, before.speakers.R.cabinet!));
    const old = before.veneer!.faces.R.leaves[0]!;
    await releaseReserve(db(), { leafId: reserve!.leaf_id, cabinetId: cabinet!.id, position: old.position, reason: "dent in the right side panel" }, { id: users.get("veneer")!.id });
    const after = await certificateData(db(), reserve!.pair_id, { baseUrl: BASE, copy: false });
    const face = after.veneer!.faces.R.leaves;
    expect(face).toHaveLength(before.veneer!.faces.R.leaves.length);
    expect(face[0]).toMatchObject({ position: old.position, leafNo: Number(reserve!.seq), replacement: true, orientation: "turned" });
    expect(face.map((l) => l.leafNo)).not.toContain(old.leafNo);
    expect((await faceLeavesOf(reserve!.pair_id)).R).toEqual(face.map((l) => l.leafNo));
  });
});

describe("issueCertificate", () => {
  test("codes are 128 random bits as 26 lower-case base32 characters, and differ between pairs", async () => {
    // RFC 4648 §10 test vectors, lower case and without padding (docs/REFERENCES.md, § Reading back what Twinleaf prints).
    expect(base32(new TextEncoder().encode("foobar"))).toBe("mzxw6ytboi");
    expect(base32(new TextEncoder().encode("f"))).toBe("my");
    const codes = (await db().select({ code: certificates.code }).from(certificates)).map((r) => r.code);
    expect(codes.length).toBeGreaterThan(20);
    for (const code of codes) expect(code).toMatch(CERTIFICATE_CODE_PATTERN);
    expect(new Set(codes).size).toBe(codes.length);
  });

  test("issuing twice gives the same certificate, with one issued event", async () => {
    const [tested] = await pairs(sql`p.state = 'ready_to_pack'`);
    expect(await certificateOf(db(), tested!.id)).toBeNull();
    const first = await issueCertificate(db(), tested!.id, users.get("packing")!.id);
    const second = await issueCertificate(db(), tested!.id, users.get("service")!.id);
    expect(second).toEqual(first);
    expect(first.code).toMatch(/^[a-z2-7]{26}$/);
    const issued = await db().select().from(events).where(and(eq(events.type, "certificate.issued"), eq(events.subjectId, tested!.id)));
    expect(issued).toHaveLength(1);
    expect(issued[0]!.data).not.toHaveProperty("code");
    // Two pairs' codes differ.
    const shippedCert = await certificateOf(db(), shipped.id);
    expect(shippedCert!.code).not.toBe(first.code);
  });

  test("a pair without a passing final test is refused with 409 and nothing is written", async () => {
    const [untested] = await pairs(sql`p.state IN ('in_assembly', 'in_production') AND NOT EXISTS (SELECT 1 FROM final_tests t WHERE t.pair_id = p.id)`);
    const count = async () => (await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM events`))[0]!.n;
    const before = await count();
    const err = await issueCertificate(db(), untested!.id, users.get("packing")!.id).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 409, message: `${untested!.identity} has no passing final test yet.` });
    expect(await certificateOf(db(), untested!.id)).toBeNull();
    expect(await count()).toBe(before);
  });
});

// ---- the print route -------------------------------------------------------------------------

async function signInAs(role: string) {
  request.sessionId = (await startSession(users.get(role)!.id, db())).session.id;
}

/** Presses the print button: a POST from this origin, then the browser follows the 303 to the recorded print. */
async function print(identity: string, query = "") {
  const posted = await certificateRoute(new Request(`${BASE}/api/v1/pairs/${encodeURIComponent(identity)}/certificate${query}`, { method: "POST", headers: { origin: BASE } }), {
    params: Promise.resolve({ identity: encodeURIComponent(identity) }),
  });
  if (posted.status !== 303) return { res: posted, body: Buffer.from(await posted.arrayBuffer()), location: null };
  const location = posted.headers.get("location")!;
  const printId = decodeURIComponent(location.split("/").pop()!);
  const res = await printRoute(new Request(`${BASE}${location}`), { params: Promise.resolve({ identity: encodeURIComponent(identity), printId }) });
  return { res, body: Buffer.from(await res.arrayBuffer()), location };
}

async function printEvents(pairId: string) {
  return db().select().from(events).where(and(eq(events.type, "certificate.printed"), eq(events.subjectId, pairId))).orderBy(events.id);
}

/** A passing final test for a built pair, as the lab records one (responses from the history's own pair). */
async function passFinalTest(pairId: string) {
  const [template] = await db().select().from(finalTests).where(eq(finalTests.pass, true)).limit(1);
  const rs = await db().select().from(responses).where(sql`${responses.id} IN (${template!.leftResponseId}, ${template!.rightResponseId})`);
  const speakers = await db().all<{ id: string; position: string }>(sql`SELECT child_id AS id, position FROM links WHERE parent_id = ${pairId} AND ended_at IS NULL ORDER BY position`);
  const eventId = await appendEvent(db(), { actorId: users.get("lab")!.id, station: "lab", type: "pair.final_tested", subjectKind: "item", subjectId: pairId, data: { pass: true } });
  const ids: number[] = [];
  for (const [i, s] of speakers.entries()) {
    const [row] = await db().insert(responses).values({ itemId: s.id, purpose: "final", points: rs[i]!.points, source: "upload", eventId }).returning({ id: responses.id });
    ids.push(row!.id);
  }
  await db().insert(finalTests).values({ pairId, leftResponseId: ids[0]!, rightResponseId: ids[1]!, limitDb: 1, maxDiffDb: template!.maxDiffDb, worstBand: template!.worstBand, pass: true, eventId });
}

describe("POST /api/v1/pairs/[identity]/certificate, then its recorded print", () => {
  test("the first print is the original, the second a copy; each is an event", async () => {
    const [pair] = await pairs(sql`p.state = 'awaiting_test'`);
    await passFinalTest(pair!.id);
    await signInAs("packing");
    // The request may name a station; the event takes it from the server (the packer's own area), never from the request.
    const first = await print(pair!.identity, "?station=packing-bench");
    expect(first.res.status).toBe(200);
    expect(first.res.headers.get("content-type")).toBe("application/pdf");
    expect(first.res.headers.get("content-disposition")).toBe(`inline; filename="certificate-${pair!.identity}.pdf"`);
    expect(first.res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(first.body.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    const cert = await certificateOf(db(), pair!.id);
    expect(cert).not.toBeNull();
    let printed = await printEvents(pair!.id);
    expect(printed).toHaveLength(1);
    expect(printed[0]).toMatchObject({ actorId: users.get("packing")!.id, station: "packing", data: { identity: pair!.identity, certificateId: cert!.id, copy: false } });
    const firstText = (await pdfText(first.body)).text;
    expect(firstText).toContain(pair!.identity);
    expect(firstText).not.toContain("COPY");

    await signInAs("service");
    const second = await print(pair!.identity);
    expect(second.res.status).toBe(200);
    printed = await printEvents(pair!.id);
    expect(printed).toHaveLength(2);
    expect(printed[1]).toMatchObject({ actorId: users.get("service")!.id, station: "service", data: { certificateId: cert!.id, copy: true } });
    expect((await pdfText(second.body)).text).toContain("COPY");
    // Still one certificate, issued once.
    expect(await certificateOf(db(), pair!.id)).toEqual(cert);
  });

  test("a pair that shipped with its certificate prints a copy; copy=1 asks for one outright", async () => {
    await signInAs("service");
    const before = (await printEvents(shipped.id)).length;
    expect(before).toBe(1); // the original, printed at packing in the history
    const out = await print(shipped.identity);
    expect(out.res.status).toBe(200);
    expect((await pdfText(out.body)).text).toContain("COPY");
    const after = await printEvents(shipped.id);
    expect(after).toHaveLength(2);
    expect(after[1]!.data).toMatchObject({ copy: true });

    // A certificate issued but never printed: copy=1 prints a spare without using up the original.
    const [tested] = await pairs(sql`p.state = 'ready_to_pack'`);
    const spare = await print(tested!.identity, "?copy=1");
    expect(spare.res.status).toBe(200);
    expect((await pdfText(spare.body)).text).toContain("COPY");
    expect((await printEvents(tested!.id)).map((e) => e.data.copy)).toEqual([true]);
  });

  test("an unknown serial is 404; a pair without a passing final test is 409; both write nothing", async () => {
    await signInAs("packing");
    const [untested] = await pairs(sql`p.state = 'in_production'`);
    const count = async () => (await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM events) + (SELECT count(*) FROM certificates) AS n`))[0]!.n;
    const before = await count();
    const unknown = await print("P-PW2-26-99999-X");
    expect(unknown.res.status).toBe(404);
    const refused = await print(untested!.identity);
    expect(refused.res.status).toBe(409);
    expect(JSON.parse(refused.body.toString("utf8"))).toMatchObject({ error: `${untested!.identity} has no passing final test yet.` });
    expect(await count()).toBe(before);
    expect(await failureText(() => issueCertificate(db(), untested!.id, null))).toContain("has no passing final test yet.");
  });

  test("without a session it answers 401; the administrator, who prints nothing, 403", async () => {
    request.sessionId = null;
    expect((await print(shipped.identity)).res.status).toBe(401);
    await signInAs("admin");
    expect((await print(shipped.identity)).res.status).toBe(403);
  });
});

describe("the trim parts on the certificate", () => {
  test("a built pair of a model with trim lists each speaker's trim parts with their supplier's lots, as the register links them, and the PDF prints them", async () => {
    // The tower is the demo model with trim (a top housing and a plinth, invented: db/seed/data.ts).
    const built = await pairs(sql`m.code = 'TB3' AND p.state IN ('awaiting_test', 'ready_to_pack', 'packed', 'shipped')`);
    expect(built.length).toBeGreaterThan(0);
    const pair = built[0]!;
    const d = await certificateData(db(), pair.id, { baseUrl: BASE, copy: false });
    // What the register holds, read directly: each speaker's trim part at its position, and the lot inside it.
    const rows = await db().all<{ side: string; position: string; identity: string; lot: string }>(sql`
      SELECT spk.position AS side, tp.position, t.identity, lot.identity AS lot
      FROM links spk
      JOIN links tp ON tp.parent_id = spk.child_id AND tp.ended_at IS NULL
      JOIN items t ON t.id = tp.child_id AND t.kind = 'trim_part'
      JOIN links ll ON ll.parent_id = t.id AND ll.position = 'SLOT' AND ll.ended_at IS NULL
      JOIN items lot ON lot.id = ll.child_id
      WHERE spk.parent_id = ${pair.id} AND spk.ended_at IS NULL AND spk.position IN ('L', 'R')`);
    expect(rows.length).toBe(4);
    expect(d.trim.map((r) => r.position)).toEqual(["PLN", "TOP"]);
    for (const r of rows) {
      const row = d.trim.find((t) => t.position === r.position)!;
      expect(r.side === "L" ? row.left : row.right).toEqual({ identity: r.identity, lot: r.lot });
    }
    const { text, pages } = await pdfText(await renderCertificate(d));
    expect(pages).toBe(1);
    expect(text).toContain("Trim parts");
    for (const r of rows) {
      expect(text).toContain(r.identity);
      expect(text).toContain(`lot ${r.lot}`);
    }
  });

  test("a model without trim prints no trim table", async () => {
    const built = await pairs(sql`m.code = 'PW2' AND p.state = 'shipped'`);
    const d = await certificateData(db(), built[0]!.id, { baseUrl: BASE, copy: false });
    expect(d.trim).toEqual([]);
    expect((await pdfText(await renderCertificate(d))).text).not.toContain("Trim parts");
  });
});
