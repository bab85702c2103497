import { createHash } from "node:crypto";
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { sql } from "drizzle-orm";
import sharp from "sharp";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, openDb } from "@/db";
import { userRoles, users } from "@/db/schema";
import { BackupError, checkBackup, DATABASE_FILE, MANIFEST, restoreBackup, takeBackup, type Manifest } from "@/lib/audit/backup";
import { verifyAuditTrail } from "@/lib/audit/verify";
import { newId } from "@/lib/auth/tokens";
import { createItem } from "@/lib/genealogy/graph";
import { storeUploads } from "@/lib/uploads";
import { failureText } from "./helpers";

const root = process.env.TWINLEAF_TEST_DIR!;
const UPLOADS = mkdtempSync(join(root, "uploads-"));
process.env.UPLOADS_DIR = UPLOADS;
const BACKUPS = mkdtempSync(join(root, "backups-"));
const db = () => getDb();
const sha = (path: string) => createHash("sha256").update(readFileSync(path)).digest("hex");

let backupDir = "";
let manifest: Manifest;
let writtenDuring = 0;

/** A generated gradient (never a real photo). */
async function picture(shade: number) {
  const raw = Buffer.alloc(32 * 24 * 3, shade);
  return new Uint8Array(await sharp(raw, { raw: { width: 32, height: 24, channels: 3 } }).png().toBuffer());
}

beforeAll(async () => {
  const actorId = newId();
  await db().insert(users).values({ id: actorId, email: `veneer.${actorId.slice(0, 6)}@workshop.twinleaf.test`, name: "Veneer", passwordHash: null });
  await db().insert(userRoles).values({ userId: actorId, role: "veneer" });
  const flitch = await db().transaction((tx) => createItem(tx, { kind: "flitch", identity: "F-B-1", state: "in_stock" }, { actorId, station: "veneer" }));
  await storeUploads(db(), [{ name: "a.png", bytes: await picture(40) }, { name: "b.png", bytes: await picture(200) }], {
    subject: { kind: "item", id: flitch.id },
    purpose: "photo",
    accept: "image",
    actorId,
    station: "veneer",
  });

  // Another connection keeps recording while the backup runs, as the running app would.
  const app = openDb(process.env.DATABASE_URL!);
  let stop = false;
  const writer = (async () => {
    for (let i = 0; !stop; i++) {
      await app.db.transaction((tx) => createItem(tx, { kind: "pair", identity: `P-B-${i}`, state: "planned" }, { actorId, station: "assembly" }));
      writtenDuring++;
      // libSQL's local driver answers without leaving the microtask queue: yield, as requests would.
      await new Promise((r) => setImmediate(r));
    }
  })();
  // Let the writer get going before the snapshot.
  while (writtenDuring < 5) await new Promise((r) => setTimeout(r, 5));
  ({ dir: backupDir, manifest } = await takeBackup({ url: process.env.DATABASE_URL!, uploadsDir: UPLOADS, into: BACKUPS }));
  const atBackupEnd = writtenDuring;
  while (writtenDuring < atBackupEnd + 5) await new Promise((r) => setTimeout(r, 5));
  stop = true;
  await writer;
  app.client.close();
});

describe("a backup taken while the register writes", () => {
  test("holds a manifest with every table's rows, every file's checksum and the chain's head", async () => {
    expect(readdirSync(BACKUPS)).toEqual([backupDir.split("/").at(-1)]);
    expect(Object.keys(manifest.files).filter((f) => f.startsWith("uploads/"))).toHaveLength(4); // two pictures and their thumbnails
    for (const [file, want] of Object.entries(manifest.files)) expect(sha(join(backupDir, file))).toBe(want.sha256);
    expect(manifest.tables.events).toBe(manifest.auditHead!.id);
    // Some pairs were recorded after the snapshot: the live register moved on, the backup did not.
    const live = Number((await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM items`))[0]!.n);
    expect(manifest.tables.items).toBeLessThan(live);
    expect(manifest.tables.items).toBeGreaterThan(1);
  });

  test("restores into a fresh instance with the same rows, files and chain, in WAL mode", async () => {
    const target = mkdtempSync(join(root, "restored-"));
    const url = `file:${join(target, "twinleaf.db")}`;
    const uploadsDir = join(target, "uploads");
    await restoreBackup({ dir: backupDir, url, uploadsDir });
    const { client, db: restored } = openDb(url);
    try {
      for (const [table, n] of Object.entries(manifest.tables)) {
        expect([table, Number((await client.execute(`SELECT count(*) AS n FROM "${table}"`)).rows[0]!.n)]).toEqual([table, n]);
      }
      for (const [file, want] of Object.entries(manifest.files).filter(([f]) => f.startsWith("uploads/"))) {
        expect(sha(join(uploadsDir, file.slice("uploads/".length)))).toBe(want.sha256);
      }
      const report = await verifyAuditTrail(restored);
      expect(report.intact).toBe(true);
      expect(report.head).toMatchObject(manifest.auditHead!);
      // The restored log is the live log up to the snapshot, hash for hash.
      const live = await db().all<{ hash: string }>(sql`SELECT hash FROM events WHERE id <= ${manifest.auditHead!.id} ORDER BY id`);
      const back = await client.execute("SELECT hash FROM events ORDER BY id");
      expect(back.rows.map((r) => r.hash)).toEqual(live.map((r) => r.hash));
      expect((await client.execute("PRAGMA journal_mode")).rows[0]!.journal_mode).toBe("wal");
    } finally {
      client.close();
    }
  });

  test("refuses to overwrite a database unless told to, and keeps the one it replaces", async () => {
    const target = mkdtempSync(join(root, "occupied-"));
    const url = `file:${join(target, "twinleaf.db")}`;
    writeFileSync(join(target, "twinleaf.db"), "");
    expect(await failureText(() => restoreBackup({ dir: backupDir, url, uploadsDir: join(target, "uploads") }))).toMatch(/already exists/);
    const { keptAs } = await restoreBackup({ dir: backupDir, url, uploadsDir: join(target, "uploads"), replace: true });
    expect(keptAs && existsSync(keptAs)).toBe(true);
  });
});

/** A damaged copy of the backup; `fix` re-signs a file in the manifest as an attacker would. */
function damagedCopy(damage: (dir: string, m: Manifest) => void): string {
  const dir = mkdtempSync(join(root, "damaged-"));
  cpSync(backupDir, dir, { recursive: true });
  const m = JSON.parse(readFileSync(join(dir, MANIFEST), "utf8")) as Manifest;
  damage(dir, m);
  if (existsSync(join(dir, MANIFEST))) writeFileSync(join(dir, MANIFEST), JSON.stringify(m));
  return dir;
}
const resign = (dir: string, m: Manifest, file: string) => (m.files[file] = { bytes: readFileSync(join(dir, file)).byteLength, sha256: sha(join(dir, file)) });

async function editDb(dir: string, statements: string[]) {
  const { client } = openDb(`file:${join(dir, DATABASE_FILE)}`);
  for (const s of statements) await client.execute(s);
  await client.execute("PRAGMA journal_mode = DELETE");
  client.close();
}

describe("a damaged or doctored backup is refused and restores nothing", () => {
  const upload = () => Object.keys(manifest.files).find((f) => f.startsWith("uploads/"))!;
  test.each<[string, (dir: string, m: Manifest) => Promise<void> | void, RegExp]>([
    ["an uploaded file changed", (dir) => writeFileSync(join(dir, upload()), "not a picture"), /does not match its checksum/],
    ["an uploaded file removed", (dir) => rmSync(join(dir, upload())), /is missing/],
    ["a file slipped in", (dir) => writeFileSync(join(dir, "uploads", "extra.bin"), "x"), /not in the manifest/],
    ["the database changed", (dir) => writeFileSync(join(dir, DATABASE_FILE), Buffer.concat([readFileSync(join(dir, DATABASE_FILE)), Buffer.from("x")])), /twinleaf\.db does not match its checksum/],
    ["the manifest's row count changed", (_dir, m) => void (m.tables.items = m.tables.items! + 1), /items holds \d+ rows; the manifest says/],
    ["the manifest's newest event changed", (_dir, m) => void (m.auditHead = { id: m.auditHead!.id, hash: "f".repeat(64) }), /not in the log as it was/],
    [
      "an event edited inside the database and its checksum re-signed",
      async (dir, m) => {
        await editDb(dir, ["DROP TRIGGER events_no_update", "UPDATE events SET reason = 'quietly' WHERE id = 2", updateTrigger()]);
        resign(dir, m, DATABASE_FILE);
      },
      /Event 2 was changed after it was written/,
    ],
    [
      "the newest events cut off, the manifest rewritten to match",
      async (dir, m) => {
        const last = m.auditHead!.id;
        await editDb(dir, ["PRAGMA foreign_keys = OFF", "DROP TRIGGER events_no_delete", `DELETE FROM events WHERE id = ${last}`, "CREATE TRIGGER `events_no_delete` BEFORE DELETE ON `events`\nBEGIN\n  SELECT RAISE(ABORT, 'events are append-only: they cannot be deleted');\nEND"]);
        m.tables.events = m.tables.events! - 1;
        resign(dir, m, DATABASE_FILE);
      },
      /newest events are missing/,
    ],
  ])("%s", async (_name, damage, message) => {
    const dir = damagedCopy(() => undefined);
    const m = JSON.parse(readFileSync(join(dir, MANIFEST), "utf8")) as Manifest;
    await damage(dir, m);
    writeFileSync(join(dir, MANIFEST), JSON.stringify(m));
    const { problems } = await checkBackup(dir);
    expect(problems.join("\n")).toMatch(message);
    const target = mkdtempSync(join(root, "never-"));
    const text = await failureText(() => restoreBackup({ dir, url: `file:${join(target, "twinleaf.db")}`, uploadsDir: join(target, "uploads") }));
    expect(text).toMatch(/cannot be restored; nothing was changed/);
    expect(readdirSync(target)).toEqual([]);
  });

  test("a folder without its manifest is an unfinished backup", async () => {
    const dir = damagedCopy((d) => rmSync(join(d, MANIFEST)));
    await expect(checkBackup(dir)).rejects.toThrow(BackupError);
    await expect(checkBackup(dir)).rejects.toThrow(/not a finished backup/);
  });

  test("the untouched backup checks clean", async () => {
    expect((await checkBackup(backupDir)).problems).toEqual([]);
  });
});

// The update trigger as the migration wrote it, put back after the edit so only the chain can tell.
function updateTrigger(): string {
  return readFileSync(join(process.cwd(), "db/migrations/0001_events_append_only.sql"), "utf8").split("--> statement-breakpoint")[0]!.trim();
}
