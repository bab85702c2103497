import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers, owners } from "@/db/schema";
import { changeState, createItem, itemByIdentity } from "@/lib/genealogy/graph";
import { search } from "@/lib/search/search";
import { formatSerial, mod37_2Check } from "@/lib/serials";

const by = { actorId: null, station: "admin" as const };
const pairSerial = formatSerial({ kind: "pair", code: "PW2", year: 2026, seq: 42 });
const otherSerial = formatSerial({ kind: "pair", code: "PW2", year: 2026, seq: 43 });

beforeAll(async () => {
  const db = getDb();
  await db.transaction(async (tx) => {
    await createItem(tx, { kind: "pair", identity: pairSerial, state: "shipped" }, by);
    await createItem(tx, { kind: "pair", identity: otherSerial, state: "packed" }, by);
    await createItem(tx, { kind: "component_lot", identity: "LOT-CAP-2506-A", state: "in_stock", partType: "capacitor" }, by);
  });
  await db.insert(dealers).values({ id: "d1", code: "QTS", name: "Quillon Hi-Fi Rooms", city: "Dunmere", country: "GB", email: "shop@quillon.test" });
  await db.insert(owners).values({ id: "o1", name: "Marit Oyelaran", email: "marit@owners.test", town: "Halvik", country: "NO" });
});

describe("search", () => {
  test.each([
    ["the canonical serial", pairSerial],
    ["lower case with spaces, as typed", pairSerial.toLowerCase().replace(/-/g, " ")],
    ["without separators, as some scanners send it", pairSerial.replace(/-/g, "")],
    ["with a scanner's trailing carriage return", `${pairSerial}\r`],
  ])("%s finds the exact item", async (_label, input) => {
    const answer = await search(getDb(), input);
    expect(answer.exact?.type === "item" && answer.exact.identity).toBe(pairSerial);
  });

  test("one substituted character: the check character no longer fits, and the real serial is suggested", async () => {
    const body = pairSerial.replace(/-/g, "").slice(0, -1);
    const typo = pairSerial.replace("00042", "00047");
    // ISO/IEC 7064 MOD 37-2 detects every single substitution, so the slipped form is invalid.
    expect(mod37_2Check(body.replace("00042", "00047"))).not.toBe(pairSerial.slice(-1));
    const answer = await search(getDb(), typo);
    expect(answer.exact).toBeNull();
    expect(answer.didYouMean.map((h) => (h.type === "item" ? h.identity : ""))).toContain(pairSerial);
    expect(answer.didYouMean.map((h) => (h.type === "item" ? h.identity : ""))).not.toContain(otherSerial);
  });

  test("two adjacent characters swapped are answered the same way", async () => {
    const swapped = pairSerial.replace("00042", "00024");
    const answer = await search(getDb(), swapped);
    expect(answer.didYouMean.map((h) => (h.type === "item" ? h.identity : ""))).toContain(pairSerial);
  });

  test.each([
    ["a dealer by a misspelt name", "Quilon", "Quillon Hi-Fi Rooms"],
    ["an owner by part of the name", "Oyelaran", "Marit Oyelaran"],
    ["a lot by part of its code", "CAP 2506", "LOT-CAP-2506-A"],
  ])("fuzzy: %s", async (_label, input, expected) => {
    const answer = await search(getDb(), input);
    const names = answer.fuzzy.map((h) => (h.type === "item" ? h.identity : "name" in h ? h.name : h.code));
    expect(names[0]).toBe(expected);
  });

  test("a fuzzy hit shows the state the item is in now, not the one it had when the index was built", async () => {
    const db = getDb();
    const before = await search(db, "CAP 2506");
    expect(before.fuzzy[0]).toMatchObject({ identity: "LOT-CAP-2506-A", state: "in_stock" });
    await db.transaction(async (tx) => changeState(tx, (await itemByIdentity(tx, "LOT-CAP-2506-A"))!, "quarantined", by));
    const after = await search(db, "CAP 2506");
    expect(after.fuzzy[0]).toMatchObject({ identity: "LOT-CAP-2506-A", state: "quarantined" });
  });

  test("an empty query answers nothing", async () => {
    expect(await search(getDb(), "   ")).toEqual({ query: "", exact: null, didYouMean: [], fuzzy: [] });
  });
});
