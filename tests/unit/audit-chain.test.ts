import { createHash } from "node:crypto";
import { describe, expect, test } from "vitest";
import { canonicalEvent, eventHash, GENESIS_HASH, sha256Hex, type StoredEvent } from "@/lib/audit/chain";
import { APPEND_ONLY_TABLES, requiredTriggers } from "@/lib/audit/protected";
import { triggersFromMigrations } from "@/lib/audit/triggers";
import { MIGRATIONS_FOLDER } from "@/db/migrate";

describe("SHA-256 as the chain uses it", () => {
  // Expected digests: FIPS 180-2, Appendix B.1 and B.2 (the "abc" and two-block messages), and the
  // empty string's digest as printed by `printf '' | sha256sum` (GNU coreutils), an independent tool.
  test.each([
    ["abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"],
    ["abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"],
    ["", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"],
  ])("sha256(%j)", (text, digest) => {
    expect(sha256Hex(text)).toBe(digest);
  });
});

const base: StoredEvent = { id: 7, at: 1767600000000, actorId: null, station: "quality", type: "label.printed", subjectKind: "item", subjectId: "abc", data: '{"n":1}', reason: null, correctsId: null };

describe("the canonical serialisation", () => {
  test("is a JSON array of the format, the previous hash and every column in order", () => {
    // Written out by hand from CHAINED_COLUMNS' order: the bytes the hash is taken over.
    expect(canonicalEvent(base, GENESIS_HASH)).toBe(`["twinleaf-event-v1","${GENESIS_HASH}",7,1767600000000,null,"quality","label.printed","item","abc","{\\"n\\":1}",null,null]`);
    expect(eventHash(base, GENESIS_HASH)).toBe(createHash("sha256").update(canonicalEvent(base, GENESIS_HASH)).digest("hex"));
  });

  // Each change, however small, gives another hash: the chain sees every column.
  test.each<[string, Partial<StoredEvent> | { prev: string }]>([
    ["another id", { id: 8 }],
    ["a millisecond later", { at: base.at + 1 }],
    ["an actor", { actorId: "u1" }],
    ["another station", { station: "packing" }],
    ["another type", { type: "item.created" }],
    ["another subject kind", { subjectKind: "pair" }],
    ["another subject", { subjectId: "abd" }],
    ["other data", { data: '{"n":2}' }],
    ["an empty reason instead of none", { reason: "" }],
    ["the text \"null\" as reason", { reason: "null" }],
    ["a correction", { correctsId: 3 }],
    ["the id as text", { id: "7" as unknown as number }],
    ["another previous hash", { prev: "1".repeat(64) }],
  ])("%s changes the hash", (_name, change) => {
    const prev = "prev" in change ? change.prev : GENESIS_HASH;
    const event = "prev" in change ? base : { ...base, ...change };
    expect(eventHash(event, prev)).not.toBe(eventHash(base, GENESIS_HASH));
  });
});

describe("the triggers the migrations leave", () => {
  const triggers = triggersFromMigrations(MIGRATIONS_FOLDER);
  test.each(Object.keys(APPEND_ONLY_TABLES))("%s has its no-delete and no-replace triggers", (table) => {
    for (const name of requiredTriggers(table as keyof typeof APPEND_ONLY_TABLES)) expect(triggers.get(name)?.table).toBe(table);
  });
  test("the chain's own trigger is among them", () => {
    expect(triggers.get("events_chain_linear")?.table).toBe("events");
  });
});
