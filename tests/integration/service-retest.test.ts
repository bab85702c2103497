/**
 * The re-test of a repaired pair at the service desk and the certificate revision a pass issues:
 * pass and fail, one revision per pass under concurrency, numbering 2, 3…, old codes still verify,
 * nothing internal on the public check, and the revision's PDF read back (unpdf, zxing-wasm).
 */
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import path from "node:path";
import { eq, sql } from "drizzle-orm";
import { extractText, getDocumentProxy } from "unpdf";
import { beforeAll, describe, expect, test } from "vitest";
import { prepareZXingModule, readBarcodes } from "zxing-wasm/reader";
import { getDb } from "@/db";
import { certificateRevisions, finalTests, models, serviceCases, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { certificateData, certificateOf, issueCertificate, recordRevisionPrint, renderCertificate } from "@/lib/certificates";
import { setClock } from "@/lib/clock";
import { verifyCertificate } from "@/lib/dispatch";
import { describeEvent } from "@/lib/events/describe";
import { moveCase } from "@/lib/service/states";
import { retestCase, retestView } from "@/lib/service/retest";
import { repairedCase, shippedPair } from "../fixtures/service-repair";
import { failureText } from "./helpers";

const db = () => getDb();
const BASE = "http://localhost:3000";
let desk = "";
let limitDb = 1;

/** A made-up flat response over the model's range and a little beyond, 1/12 octave apart. */
const flat = (level: number, name = "r.txt") => ({ name, text: ["Freq SPL", ...Array.from({ length: 12 * 8 }, (_, k) => `${(100 * 2 ** (k / 12)).toFixed(3)} ${level}`)].join("\n") });

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  desk = (await db().select().from(users).where(eq(users.email, "service@demo.twinleaf.test")))[0]!.id;
  limitDb = (await db().select().from(models).limit(1))[0]!.pairResponseLimitDb;
  const wasm = readFileSync(createRequire(import.meta.url).resolve("zxing-wasm/reader/zxing_reader.wasm"));
  await prepareZXingModule({ overrides: { wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer }, fireImmediately: true });
}, 90_000);

let n = 0;
/** A shipped pair with its original certificate, its right tweeter replaced in a case now "repaired". */
async function repaired(at = "2026-12-04T10:00:00Z") {
  setClock(new Date(at));
  const built = await shippedPair(db(), desk);
  const certificate = await issueCertificate(db(), built.pair.id, desk);
  const c = await repairedCase(db(), { pair: built.pair, speakers: built.speakers, failed: built.tweeters.R, side: "R", code: `RT2601-${8000 + ++n}` }, desk);
  return { ...built, certificate, case: c };
}

const stateOf = async (caseId: string) => (await db().select().from(serviceCases).where(eq(serviceCases.id, caseId)))[0]!.state;
const revisionsOf = (certificateId: string) => db().select().from(certificateRevisions).where(eq(certificateRevisions.certificateId, certificateId)).orderBy(certificateRevisions.revision);

describe("the re-test of a repaired pair", () => {
  test("a fail records the test with the case named, shows the figures, and leaves the case repaired with no revision", async () => {
    const r = await repaired();
    // 0.5 dB over the model's limit in every band: |L − R| = limit + 0.5 dB.
    const result = await retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90 + limitDb + 0.5) }, { id: desk });
    expect(result.comparison.pass).toBe(false);
    expect(result.comparison.maxAbsDiffDb).toBeCloseTo(limitDb + 0.5, 9);
    expect(result.revision).toBeNull();
    expect(await stateOf(r.case.caseId)).toBe("repaired");
    const [test] = await db().select().from(finalTests).where(eq(finalTests.id, result.finalTestId));
    expect(test).toMatchObject({ pairId: r.pair.id, pass: false });
    const events = await db().all<{ type: string; station: string; code: string }>(sql`SELECT type, station, json_extract(data, '$.code') AS code FROM events WHERE type IN ('pair.final_tested', 'case.retested') AND json_extract(data, '$.finalTestId') IS ${result.finalTestId} OR (type = 'pair.final_tested' AND id = ${test!.eventId})`);
    expect(events.map((e) => e.type).sort()).toEqual(["case.retested", "pair.final_tested"]);
    for (const e of events) expect(e).toMatchObject({ station: "service", code: r.case.code });
    expect(await revisionsOf(r.certificate.id)).toEqual([]);
  });

  test("a band exactly at the limit passes (the lab's rule): the case is tested and revision 2 says what was replaced and when", async () => {
    const r = await repaired("2026-12-04T10:00:00Z");
    const result = await retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90 + limitDb) }, { id: desk });
    expect(result.comparison.pass).toBe(true);
    expect(await stateOf(r.case.caseId)).toBe("tested");
    const [rev] = await revisionsOf(r.certificate.id);
    expect(rev).toMatchObject({ revision: 2, caseId: r.case.caseId, finalTestId: result.finalTestId });
    // The day of the fit, in the workshop's zone (UTC in the tests): 4 December 2026.
    expect(rev!.repairLine).toBe("Right speaker's tweeter replaced on 4 December 2026 after a service visit");
    expect(rev!.replaced).toEqual([{ side: "R", position: "T", part: "tweeter", removed: r.tweeters.R.identity, fitted: r.case.fitted.identity, at: expect.any(Number) }]);
    expect(rev!.code).not.toBe(r.certificate.code);
    expect((await retestView(db(), r.case.code.toLowerCase()))!).toMatchObject({ revision: { revision: 2, repairLine: rev!.repairLine }, test: { id: result.finalTestId, pass: true } });
    const [revised] = await db().all<{ id: number }>(sql`SELECT id FROM events WHERE id = ${rev!.eventId} AND type = 'certificate.revised' AND station = 'service'`);
    expect(revised).toBeDefined();
    const [row] = await db().all<{ type: string; data: string }>(sql`SELECT type, data FROM events WHERE id = ${rev!.eventId}`);
    expect(describeEvent(row!.type, JSON.parse(row!.data))).toBe("issued revision 2 of the certificate");
    expect(await failureText(() => retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90) }, { id: desk }))).toMatch(/only a repaired pair/);
  });

  test("two re-tests sent at once: one passes and issues one revision, the other is refused and writes nothing", async () => {
    const r = await repaired();
    const before = Number((await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM final_tests`))[0]!.n);
    const results = await Promise.allSettled([0, 1, 2].map(() => retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90.2) }, { id: desk })));
    expect(results.filter((x) => x.status === "fulfilled")).toHaveLength(1);
    for (const x of results.filter((x) => x.status === "rejected")) expect(String((x as PromiseRejectedResult).reason.message)).toMatch(/re-tested or moved meanwhile|only a repaired pair/);
    expect(await revisionsOf(r.certificate.id)).toHaveLength(1);
    expect(Number((await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM final_tests`))[0]!.n)).toBe(before + 1);
  });

  test("a second repair of the same pair issues revision 3; every older code still verifies and says a newer one exists", async () => {
    const r = await repaired("2026-12-04T10:00:00Z");
    await retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90) }, { id: desk });
    await moveCase(db(), { caseId: r.case.caseId, from: "tested", to: "sent_back" }, { id: desk });
    await moveCase(db(), { caseId: r.case.caseId, from: "sent_back", to: "closed" }, { id: desk });
    setClock(new Date("2027-03-10T09:00:00Z"));
    const again = await repairedCase(db(), { pair: r.pair, speakers: r.speakers, failed: r.tweeters.L, side: "L", code: `RT2601-${8000 + ++n}` }, desk);
    await retestCase(db(), { code: again.code, left: flat(90), right: flat(90) }, { id: desk });
    const revs = await revisionsOf(r.certificate.id);
    expect(revs.map((x) => x.revision)).toEqual([2, 3]);
    expect(revs[1]!.repairLine).toBe("Left speaker's tweeter replaced on 10 March 2027 after a service visit");

    const original = await verifyCertificate(db(), r.certificate.code);
    const second = await verifyCertificate(db(), revs[0]!.code);
    const current = await verifyCertificate(db(), revs[1]!.code.toUpperCase());
    expect(original).toMatchObject({ pairSerial: r.pair.identity, revision: { number: 1 }, current: { number: 3, issuedOn: revs[1]!.issuedAt } });
    expect(second).toMatchObject({ revision: { number: 2 }, current: { number: 3 } });
    expect(current).toMatchObject({ revision: { number: 3 }, current: { number: 3 } });
    expect(current!.repairs).toEqual([revs[1]!.repairLine, revs[0]!.repairLine]);

    // Nothing internal: no case code, no ids, no names, no certificate codes in what the page shows.
    const shown = JSON.stringify([original, second, current]);
    const [person] = await db().select().from(users).where(eq(users.id, desk));
    for (const secret of [r.case.code, again.code, r.case.caseId, r.pair.id, r.certificate.id, revs[0]!.id, person!.name, person!.email, r.certificate.code, revs[0]!.code, revs[1]!.code]) expect(shown).not.toContain(secret);
  });

  test("the revision's PDF says Revision 2, what was replaced and when, and its QR code opens the revision's own link", async () => {
    const r = await repaired("2026-12-04T10:00:00Z");
    await retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90) }, { id: desk });
    const [rev] = await revisionsOf(r.certificate.id);
    const data = await certificateData(db(), r.pair.id, { baseUrl: BASE, copy: false, revisionId: rev!.id });
    expect(data.verifyUrl).toBe(`${BASE}/verify/${rev!.code}`);
    const pdf = await renderCertificate(data);
    const doc = await getDocumentProxy(new Uint8Array(pdf));
    const text = (await extractText(doc, { mergePages: true })).text.replace(/\s+/g, " ");
    expect(text).toContain("Revision 2");
    expect(text).toContain("Right speaker's tweeter replaced on 4 December 2026 after a service visit");
    expect(text).toContain(`${r.case.fitted.identity} in place of ${r.tweeters.R.identity}`);
    expect(text).not.toContain(r.case.code);
    if (spawnSync("pdftoppm", ["-v"]).status === 0) {
      const dir = mkdtempSync(path.join(tmpdir(), "twinleaf-revision-"));
      try {
        writeFileSync(path.join(dir, "c.pdf"), pdf);
        execFileSync("pdftoppm", ["-png", "-r", "200", "-f", "1", "-l", "1", path.join(dir, "c.pdf"), path.join(dir, "page")]);
        const png = readdirSync(dir).find((f) => f.endsWith(".png"))!;
        const hits = await readBarcodes(new Uint8Array(readFileSync(path.join(dir, png))), { formats: ["QRCode"], tryHarder: true });
        expect(hits.map((h) => h.text)).toEqual([`${BASE}/verify/${rev!.code}`]);
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    }
    // One original per revision; every later print of it is a copy.
    const first = await recordRevisionPrint(db(), rev!.id, { actorId: desk, copy: false, station: "service" });
    const later = await recordRevisionPrint(db(), rev!.id, { actorId: desk, copy: false, station: "service" });
    expect([first.original, later.original]).toEqual([true, false]);
    const copy = await renderCertificate(await certificateData(db(), r.pair.id, { baseUrl: BASE, copy: true, revisionId: rev!.id }));
    const copyText = (await extractText(await getDocumentProxy(new Uint8Array(copy)), { mergePages: true })).text.replace(/\s+/g, " ");
    expect(copyText).toContain("Reprint of revision 2 of the certificate, issued on 4 December 2026.");
    expect((await certificateOf(db(), r.pair.id))!.code).toBe(r.certificate.code);
  });

  test("revisions are a record: never changed, deleted or replaced", async () => {
    const r = await repaired();
    await retestCase(db(), { code: r.case.code, left: flat(90), right: flat(90) }, { id: desk });
    const [rev] = await revisionsOf(r.certificate.id);
    expect(await failureText(() => db().run(sql`UPDATE certificate_revisions SET repair_line = 'x' WHERE id = ${rev!.id}`))).toMatch(/never changed/);
    expect(await failureText(() => db().run(sql`DELETE FROM certificate_revisions WHERE id = ${rev!.id}`))).toMatch(/never deleted/);
    expect(await failureText(() => db().run(sql`INSERT OR REPLACE INTO certificate_revisions SELECT * FROM certificate_revisions WHERE id = ${rev!.id}`))).toMatch(/UNIQUE/);
  });
});
