import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Client } from "@libsql/client";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, openDb } from "@/db";
import { eventHash, GENESIS_HASH, type StoredEvent } from "@/lib/audit/chain";
import { chainHead } from "@/lib/audit/head";
import { verifyAuditTrail, type ChainProblemKind } from "@/lib/audit/verify";
import { appendEvent } from "@/lib/events/queries";
import { createItem, fit } from "@/lib/genealogy/graph";
import { failureText } from "./helpers";

// Attacks on the audit trail from behind the app's back: each one is tried on a copy of the test
// database, with the SQL an attacker holding the file could run, and must be refused or reported.

const by = (at: string) => ({ actorId: null, station: "assembly" as const, at: new Date(at) });
const db = () => getDb();
const work = mkdtempSync(join(tmpdir(), "twinleaf-audit-"));
let ids: number[] = [];
let linkId = 0;
let outboxId = 0;

beforeAll(async () => {
  const pair = await db().transaction((tx) => createItem(tx, { kind: "pair", identity: "P-A-1", state: "fitted" }, by("2026-01-05T08:00:00Z")));
  const left = await db().transaction((tx) => createItem(tx, { kind: "speaker", identity: "S-A-L", state: "fitted" }, by("2026-01-05T08:01:00Z")));
  await db().transaction((tx) => fit(tx, { parent: pair, child: left, position: "L" }, by("2026-01-05T08:02:00Z")));
  // Handed the database itself, appendEvent opens its own transaction.
  await appendEvent(db(), { actorId: null, station: "quality", type: "label.printed", subjectKind: "item", subjectId: pair.id, reason: "veneer check", data: { note: "é ✓" } });
  await appendEvent(db(), { actorId: null, station: "quality", type: "item.state_changed", subjectKind: "item", subjectId: pair.id });
  ids = (await db().all<{ id: number }>(sql.raw("SELECT id FROM events ORDER BY id"))).map((r) => Number(r.id));
  linkId = Number((await db().all<{ id: number }>(sql.raw("SELECT id FROM links LIMIT 1")))[0]!.id);
  const { client } = openDb(process.env.DATABASE_URL!);
  await client.execute("INSERT INTO outbox (event_id, \"to\", subject, text) VALUES (1, 'owner@example.test', 'Your pair', 'Ready.')");
  outboxId = Number((await client.execute("SELECT max(id) AS id FROM outbox")).rows[0]!.id);
  await client.execute({ sql: "INSERT INTO mail_attempts (outbox_id, at, ok, detail) VALUES (?, 0, 1, 'sent')", args: [outboxId] });
  client.close();
});

let copies = 0;
/** A copy of the test database, opened by its own client: the attacker's. */
async function copy(): Promise<{ client: Client; url: string }> {
  const path = join(work, `copy-${++copies}.db`);
  const { client: live } = openDb(process.env.DATABASE_URL!);
  await live.execute({ sql: "VACUUM INTO ?", args: [path] });
  live.close();
  const url = `file:${path}`;
  return { client: openDb(url).client, url };
}

async function triggerSql(client: Client, name: string): Promise<string> {
  return String((await client.execute({ sql: "SELECT sql FROM sqlite_master WHERE name = ?", args: [name] })).rows[0]!.sql);
}

/** Runs `fn` with the named triggers dropped; puts them back afterwards unless told not to. */
async function withoutTriggers(client: Client, names: string[], fn: () => Promise<unknown>, putBack = true) {
  const saved = await Promise.all(names.map((n) => triggerSql(client, n)));
  for (const n of names) await client.execute(`DROP TRIGGER ${n}`);
  await fn();
  if (putBack) for (const s of saved) await client.execute(s);
}

async function storedEvent(client: Client, id: number): Promise<StoredEvent & { prevHash: string; hash: string }> {
  const r = (await client.execute({ sql: "SELECT * FROM events WHERE id = ?", args: [id] })).rows[0]!;
  return {
    id: Number(r.id), at: Number(r.at), actorId: r.actor_id as string | null, station: String(r.station), type: String(r.type),
    subjectKind: String(r.subject_kind), subjectId: String(r.subject_id), data: String(r.data), reason: r.reason as string | null,
    correctsId: r.corrects_id == null ? null : Number(r.corrects_id), prevHash: String(r.prev_hash), hash: String(r.hash),
  };
}

describe("the chain as the app writes it", () => {
  test("every event names the one before it and its hash covers its content", async () => {
    const { client } = await copy();
    let prev = GENESIS_HASH;
    for (const id of ids) {
      const e = await storedEvent(client, id);
      expect(e.prevHash).toBe(prev);
      expect(e.hash).toBe(eventHash(e, prev));
      prev = e.hash;
    }
    client.close();
  });

  test("the untouched log reads as intact, with every protective rule in place", async () => {
    const report = await verifyAuditTrail(db());
    expect(report.triggers).toEqual([]);
    expect(report.firstBreak).toBeNull();
    expect(report.intact).toBe(true);
    expect(report.events).toBe(ids.length);
    expect(report.head?.id).toBe(ids.at(-1));
  });

  test("two connections appending at once keep one line (BEGIN IMMEDIATE, head read inside)", async () => {
    const a = openDb(process.env.DATABASE_URL!);
    const b = openDb(process.env.DATABASE_URL!);
    const ev = { actorId: null, station: "quality" as const, type: "label.printed" as const, subjectKind: "item", subjectId: "x" };
    // Each client's transaction runs on its own connection, so SQLite's lock is what orders them.
    const written = await Promise.all(Array.from({ length: 12 }, (_, i) => (i % 2 ? a.db : b.db).transaction((tx) => appendEvent(tx, ev))));
    a.client.close();
    b.client.close();
    expect(new Set(written).size).toBe(12);
    const report = await verifyAuditTrail(db());
    expect(report.firstBreak).toBeNull();
    expect(report.intact).toBe(true);
    ids = (await db().all<{ id: number }>(sql.raw("SELECT id FROM events ORDER BY id"))).map((r) => Number(r.id));
  });

  test("an event not chained to the newest one is refused", async () => {
    const head = await chainHead(db());
    const text = await failureText(() =>
      db().run(sql.raw(`INSERT INTO events (at, station, type, subject_kind, subject_id, data, prev_hash, hash) VALUES (0, 'quality', 'label.printed', 'item', 'x', '{}', '${GENESIS_HASH}', '${"a".repeat(64)}')`)),
    );
    expect(text).toMatch(/chained/);
    expect((await chainHead(db())).id).toBe(head.id);
  });
});

describe("rows that record what happened are never replaced or deleted", () => {
  const first = () => ids[0]!;
  test.each([
    ["INSERT OR REPLACE on an event", () => `INSERT OR REPLACE INTO events SELECT id, at, actor_id, station, 'item.state_changed', subject_kind, subject_id, data, reason, corrects_id, prev_hash, hash FROM events WHERE id = ${first()}`],
    ["REPLACE on an event", () => `REPLACE INTO events (id, at, station, type, subject_kind, subject_id, data) VALUES (${first()}, 0, 'quality', 'item.state_changed', 'item', 'x', '{}')`],
    ["an upsert on an event", () => `INSERT INTO events (id, at, station, type, subject_kind, subject_id, data) VALUES (${first()}, 0, 'quality', 'item.state_changed', 'item', 'x', '{}') ON CONFLICT(id) DO UPDATE SET reason = 'gone'`],
    ["INSERT OR REPLACE on a link", () => `INSERT OR REPLACE INTO links SELECT * FROM links WHERE id = ${linkId}`],
    ["INSERT OR REPLACE on queued mail", () => `INSERT OR REPLACE INTO outbox (id, "to", subject, text) VALUES (${outboxId}, 'someone@example.test', 'x', 'x')`],
    ["INSERT OR REPLACE on a mail try", () => `INSERT OR REPLACE INTO mail_attempts SELECT * FROM mail_attempts LIMIT 1`],
    ["INSERT OR REPLACE on an item's identity, under a new id", () => `INSERT OR REPLACE INTO items (id, kind, identity, state) VALUES ('fresh-id', 'pair', 'P-A-1', 'scrapped')`],
    ["deleting queued mail", () => `DELETE FROM outbox WHERE id = ${outboxId}`],
    ["deleting a mail try", () => `DELETE FROM mail_attempts`],
    ["deleting an item", () => `DELETE FROM items WHERE identity = 'P-A-1'`],
  ])("%s is refused and changes nothing", async (_name, statement) => {
    const { client } = await copy();
    const before = (await client.execute("SELECT (SELECT group_concat(hash) FROM events) || (SELECT count(*) FROM outbox) || (SELECT count(*) FROM mail_attempts) || (SELECT group_concat(id || state) FROM items) || (SELECT group_concat(id) FROM links) AS s")).rows[0]!.s;
    await expect(client.execute(statement())).rejects.toThrow(/never replaced|never deleted|append-only|chained/);
    const after = (await client.execute("SELECT (SELECT group_concat(hash) FROM events) || (SELECT count(*) FROM outbox) || (SELECT count(*) FROM mail_attempts) || (SELECT group_concat(id || state) FROM items) || (SELECT group_concat(id) FROM links) AS s")).rows[0]!.s;
    expect(after).toBe(before);
    client.close();
  });
});

interface Expect {
  kind?: ChainProblemKind;
  at?: () => number;
  message?: RegExp;
  trigger?: { kind: "missing" | "altered" | "unexpected"; name: string };
}

describe("edits behind the app's back are caught", () => {
  const second = () => ids[3]!; // events no other row names, so deleting or moving them trips no foreign key
  const third = () => ids[4]!;
  const last = () => ids.at(-1)!;
  const cases: [string, (c: Client) => Promise<unknown>, Expect][] = [
    [
      "UPDATE of an event's content, its trigger dropped and put back",
      (c) => withoutTriggers(c, ["events_no_update"], () => c.execute(`UPDATE events SET reason = 'nothing wrong' WHERE id = ${second()}`)),
      { kind: "content", at: second, message: /changed after it was written/ },
    ],
    [
      "UPDATE with the trigger left dropped",
      (c) => withoutTriggers(c, ["events_no_update"], () => c.execute(`UPDATE events SET at = at + 60000 WHERE id = ${third()}`), false),
      { kind: "content", at: third, trigger: { kind: "missing", name: "events_no_update" } },
    ],
    [
      "DELETE of an event in the middle",
      (c) => withoutTriggers(c, ["events_no_delete"], () => c.execute(`DELETE FROM events WHERE id = ${second()}`)),
      { kind: "missing", at: third, message: /Event \d+ is missing/ },
    ],
    [
      "DELETE of the newest events",
      (c) => withoutTriggers(c, ["events_no_delete"], () => c.execute(`DELETE FROM events WHERE id >= ${last() - 1}`)),
      { kind: "tail", message: /newest events are missing/ },
    ],
    [
      "REPLACE of an event, keeping its hashes",
      (c) =>
        withoutTriggers(c, ["events_no_replace", "events_chain_linear"], () =>
          c.execute(`INSERT OR REPLACE INTO events SELECT id, at, actor_id, station, 'item.state_changed', subject_kind, subject_id, data, reason, corrects_id, prev_hash, hash FROM events WHERE id = ${second()}`),
        ),
      { kind: "content", at: second },
    ],
    [
      "two events swapped in order",
      (c) =>
        withoutTriggers(c, ["events_no_update"], async () => {
          await c.execute(`UPDATE events SET id = -1 WHERE id = ${second()}`);
          await c.execute(`UPDATE events SET id = ${second()} WHERE id = ${third()}`);
          await c.execute(`UPDATE events SET id = ${third()} WHERE id = -1`);
        }),
      { kind: "link", at: second, message: /chain breaks between/ },
    ],
    [
      "an event's content changed and its hash forged to match",
      (c) =>
        withoutTriggers(c, ["events_no_update"], async () => {
          const e = await storedEvent(c, second());
          const forged = { ...e, reason: "never held" };
          await c.execute({ sql: "UPDATE events SET reason = ?, hash = ? WHERE id = ?", args: [forged.reason, eventHash(forged, e.prevHash), e.id] });
        }),
      { kind: "link", at: third },
    ],
    [
      "an event added without going through the register",
      (c) =>
        withoutTriggers(c, ["events_chain_linear"], () =>
          c.execute("INSERT INTO events (at, station, type, subject_kind, subject_id, data) VALUES (0, 'quality', 'item.state_changed', 'item', 'x', '{}')"),
        ),
      { kind: "unhashed", message: /no fingerprint/ },
    ],
    [
      "the event counter set back",
      (c) => c.execute("UPDATE sqlite_sequence SET seq = seq - 1 WHERE name = 'events'"),
      { kind: "counter", message: /counter was set back/ },
    ],
    [
      "a protective trigger dropped, nothing else",
      (c) => c.execute("DROP TRIGGER links_no_replace"),
      { trigger: { kind: "missing", name: "links_no_replace" } },
    ],
    [
      "the chain trigger dropped",
      (c) => c.execute("DROP TRIGGER events_chain_linear"),
      { trigger: { kind: "missing", name: "events_chain_linear" } },
    ],
    [
      "a trigger swapped for one that lets everything through",
      (c) =>
        withoutTriggers(c, ["outbox_no_delete"], () => c.execute("CREATE TRIGGER outbox_no_delete BEFORE DELETE ON outbox WHEN 0 BEGIN SELECT 1; END"), false),
      { trigger: { kind: "altered", name: "outbox_no_delete" } },
    ],
    [
      "a trigger added that rewrites what is written",
      (c) => c.execute("CREATE TRIGGER events_quiet AFTER INSERT ON events BEGIN SELECT 1; END"),
      { trigger: { kind: "unexpected", name: "events_quiet" } },
    ],
  ];

  test.each(cases)("%s", async (_name, tamper, want) => {
    const { client, url } = await copy();
    await tamper(client);
    client.close();
    const { client: reader, db: copyDb } = openDb(url);
    const report = await verifyAuditTrail(copyDb);
    reader.close();
    expect(report.intact).toBe(false);
    if (want.kind) {
      expect(report.firstBreak?.kind).toBe(want.kind);
      if (want.at) expect(report.firstBreak?.eventId).toBe(want.at());
      if (want.message) expect(report.firstBreak?.message).toMatch(want.message);
    } else {
      expect(report.firstBreak).toBeNull();
    }
    if (want.trigger) expect(report.triggers).toContainEqual(expect.objectContaining(want.trigger));
    else expect(report.triggers).toEqual([]);
    // No problem is reported with a raw trigger name or a hash: the page shows these words.
    for (const m of [report.firstBreak?.message, ...report.triggers.map((t) => t.message)]) if (m) expect(m).not.toMatch(/_no_|[0-9a-f]{16}/);
  });

  test("a whole tail rewritten with forged hashes passes the chain but not a head recorded before", async () => {
    const { client, url } = await copy();
    const head = await storedEvent(client, last());
    await withoutTriggers(client, ["events_no_update"], async () => {
      let prev = (await storedEvent(client, second())).prevHash;
      for (const id of ids.slice(ids.indexOf(second()))) {
        const e = await storedEvent(client, id);
        const forged = id === second() ? { ...e, reason: "never held" } : e;
        const hash = eventHash(forged, prev);
        await client.execute({ sql: "UPDATE events SET reason = ?, prev_hash = ?, hash = ? WHERE id = ?", args: [forged.reason, prev, hash, id] });
        prev = hash;
      }
    });
    client.close();
    const { client: reader, db: copyDb } = openDb(url);
    const bare = await verifyAuditTrail(copyDb);
    const anchored = await verifyAuditTrail(copyDb, { anchor: { id: head.id, hash: head.hash, source: "the backup of 5 Jan 2026" } });
    reader.close();
    // The limit of any hash chain kept beside the data: a full rewrite is only seen against a copy kept elsewhere.
    expect(bare.firstBreak).toBeNull();
    expect(anchored.intact).toBe(false);
    expect(anchored.anchor?.holds).toBe(false);
    expect(anchored.anchor?.message).toMatch(/not in the log as it was/);
  });
});
