import "server-only";
import { createHash } from "node:crypto";
import { createReadStream, existsSync } from "node:fs";
import { copyFile, mkdir, mkdtemp, readdir, readFile, rename, rm, stat, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve, sep } from "node:path";
import { sql } from "drizzle-orm";
import { openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { now } from "@/lib/clock";
import { formatWhen } from "@/lib/format";
import { summarizeAudit } from "./summary";
import { verifyAuditTrail } from "./verify";

// A backup is a folder: the database as one consistent snapshot (VACUUM INTO reads it inside one
// read transaction, so the app keeps writing meanwhile), the uploads, and a manifest written last
// with every table's row count, every file's SHA-256 and the audit chain's newest event. A folder
// without its manifest is an unfinished backup and is never restored.

export const MANIFEST = "manifest.json";
export const DATABASE_FILE = "twinleaf.db";
export const UPLOADS_FOLDER = "uploads";
const FORMAT = "twinleaf-backup-v1";

export interface Manifest {
  format: typeof FORMAT;
  /** When the snapshot was taken, ISO 8601. */
  takenAt: string;
  /** Row count of every table in the snapshot (Drizzle's own bookkeeping included). */
  tables: Record<string, number>;
  /** Every file of the backup but the manifest, by its path inside the backup (forward slashes). */
  files: Record<string, { bytes: number; sha256: string }>;
  /** The audit chain's newest event in the snapshot, or null for an empty log. */
  auditHead: { id: number; hash: string } | null;
}

export class BackupError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "BackupError";
  }
}

const localPath = (url: string) => {
  if (!url.startsWith("file:")) throw new BackupError(`Backups are taken of a local database file; ${url.split(":")[0]} databases are backed up by their server.`);
  return resolve(/*turbopackIgnore: true*/ url.slice("file:".length).split("?")[0]!);
};

async function sha256File(path: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

async function listFiles(root: string): Promise<string[]> {
  if (!existsSync(root)) return [];
  const out: string[] = [];
  for (const entry of await readdir(root, { withFileTypes: true, recursive: true })) {
    // parentPath from Node 20.12, path before it.
    if (entry.isFile()) out.push(join(entry.parentPath ?? (entry as unknown as { path: string }).path, entry.name));
  }
  return out.sort();
}

const posix = (p: string) => p.split(sep).join("/");

/** Row counts of every table in a database, by name. */
async function tableCounts(url: string): Promise<Record<string, number>> {
  const { client } = openDb(url);
  try {
    const names = (await client.execute("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")).rows.map((r) => String(r.name));
    const counts: Record<string, number> = {};
    for (const n of names) counts[n] = Number((await client.execute(`SELECT count(*) AS n FROM "${n.replace(/"/g, '""')}"`)).rows[0]!.n);
    return counts;
  } finally {
    client.close();
  }
}

/**
 * Takes a backup of the running register into a new folder under `into` and returns its path.
 * Uploads are copied after the snapshot: the app writes an upload's file before its row, so every
 * file the snapshot names is already there (a file newer than the snapshot is copied too, harmlessly).
 */
export async function takeBackup(opts: { url: string; uploadsDir: string; into: string }): Promise<{ dir: string; manifest: Manifest }> {
  const source = localPath(opts.url);
  if (!existsSync(source)) throw new BackupError(`There is no database at ${source}.`);
  const takenAt = now();
  const name = `twinleaf-${takenAt.toISOString().replace(/[:.]/g, "-")}`;
  const dir = resolve(/*turbopackIgnore: true*/ opts.into, name);
  const partial = `${dir}.partial`;
  if (existsSync(dir)) throw new BackupError(`${dir} already exists.`);
  await rm(partial, { recursive: true, force: true });
  await mkdir(join(partial, UPLOADS_FOLDER), { recursive: true });
  try {
    const live = openDb(opts.url);
    try {
      await live.client.execute({ sql: "VACUUM INTO ?", args: [join(partial, DATABASE_FILE)] });
    } finally {
      live.client.close();
    }
    // A plain rollback journal in the copy: reading it later leaves no -wal or -shm file behind.
    const snap = openDb(`file:${join(partial, DATABASE_FILE)}`);
    try {
      await snap.client.execute("PRAGMA journal_mode = DELETE");
    } finally {
      snap.client.close();
    }
    const snapshotUrl = `file:${join(partial, DATABASE_FILE)}`;
    const uploadsRoot = resolve(/*turbopackIgnore: true*/ opts.uploadsDir);
    for (const file of await listFiles(uploadsRoot)) {
      const to = join(partial, UPLOADS_FOLDER, relative(uploadsRoot, file));
      await mkdir(dirname(to), { recursive: true });
      await copyFile(file, to);
    }

    const { client, db } = openDb(snapshotUrl);
    let auditHead: Manifest["auditHead"];
    let missing: string[];
    try {
      const [head] = await db.all<{ id: number; hash: string | null }>(sql`SELECT id, hash FROM events ORDER BY id DESC LIMIT 1`);
      auditHead = head ? { id: Number(head.id), hash: String(head.hash) } : null;
      const stored = await db.all<{ name: string }>(sql`SELECT stored_name AS name FROM uploads UNION ALL SELECT thumb_name FROM uploads WHERE thumb_name IS NOT NULL`);
      missing = stored.map((r) => r.name).filter((n) => !existsSync(join(partial, UPLOADS_FOLDER, n)));
    } finally {
      client.close();
    }
    if (missing.length) throw new BackupError(`${missing.length} uploaded ${missing.length === 1 ? "file is" : "files are"} missing from the uploads folder (${missing.slice(0, 3).join(", ")}); the backup was not finished.`);

    const files: Manifest["files"] = {};
    for (const file of await listFiles(partial)) files[posix(relative(partial, file))] = { bytes: (await stat(file)).size, sha256: await sha256File(file) };
    const manifest: Manifest = { format: FORMAT, takenAt: takenAt.toISOString(), tables: await tableCounts(snapshotUrl), files, auditHead };
    await writeFile(join(partial, MANIFEST), `${JSON.stringify(manifest, null, 2)}\n`);
    await rename(partial, dir);
    return { dir, manifest };
  } catch (e) {
    await rm(partial, { recursive: true, force: true });
    throw e;
  }
}

export async function readManifest(dir: string): Promise<Manifest> {
  const path = join(dir, MANIFEST);
  if (!existsSync(path)) throw new BackupError(`${dir} has no ${MANIFEST}: it is not a finished backup.`);
  let m: Manifest;
  try {
    m = JSON.parse(await readFile(path, "utf8")) as Manifest;
  } catch {
    throw new BackupError(`${path} cannot be read as a backup manifest.`);
  }
  if (m?.format !== FORMAT || typeof m.tables !== "object" || typeof m.files !== "object") throw new BackupError(`${path} is not a backup manifest Twinleaf knows.`);
  return m;
}

async function removeDb(path: string) {
  for (const ext of ["", "-wal", "-shm", "-journal"]) await rm(path + ext, { force: true });
}

/**
 * Checks a backup folder and leaves a checked, migrated copy of its database at `staging`: the
 * checksums and the file list first, then on the copy (the backup itself is never opened for
 * writing) integrity, foreign keys, row counts and the audit chain against the manifest's head,
 * then, migrated to this version, the protective triggers. Returns every problem in words.
 */
async function stageAndCheck(dir: string, staging: string): Promise<{ manifest: Manifest; problems: string[] }> {
  const manifest = await readManifest(dir);
  const problems: string[] = [];
  const present = new Set((await listFiles(dir)).map((f) => posix(relative(dir, f))).filter((f) => f !== MANIFEST));
  for (const [file, want] of Object.entries(manifest.files)) {
    if (!present.has(file)) {
      problems.push(`${file} is missing.`);
      continue;
    }
    present.delete(file);
    const path = join(dir, ...file.split("/"));
    if ((await stat(path)).size !== want.bytes || (await sha256File(path)) !== want.sha256) problems.push(`${file} does not match its checksum: it changed or was damaged after the backup.`);
  }
  for (const extra of present) problems.push(`${extra} is not in the manifest.`);
  if (!manifest.files[DATABASE_FILE]) problems.push("The manifest lists no database file.");
  if (problems.length) return { manifest, problems };

  await removeDb(staging);
  await mkdir(dirname(staging), { recursive: true });
  await copyFile(join(dir, DATABASE_FILE), staging);
  const url = `file:${staging}`;
  const { client, db } = openDb(url);
  try {
    const integrity = (await client.execute("PRAGMA integrity_check")).rows.map((r) => String(Object.values(r)[0]));
    if (integrity.join() !== "ok") return { manifest, problems: [`The database file is damaged: ${integrity.slice(0, 3).join("; ")}.`] };
    const fk = await client.execute("PRAGMA foreign_key_check");
    if (fk.rows.length) problems.push(`${fk.rows.length} ${fk.rows.length === 1 ? "row names" : "rows name"} a record that is not there (the first in ${String(fk.rows[0]!.table)}).`);
    // The triggers are checked after migrating: an older backup lacks the newer ones by right.
    const anchor = manifest.auditHead ? { ...manifest.auditHead, source: `the backup of ${formatWhen(new Date(manifest.takenAt))}` } : null;
    const report = await verifyAuditTrail(db, { anchor });
    problems.push(...summarizeAudit({ ...report, triggers: [] }).problems);
    if ((report.head?.id ?? null) !== (manifest.auditHead?.id ?? null)) {
      problems.push(`The event log ends at event ${report.head?.id ?? "none"}; the manifest says ${manifest.auditHead?.id ?? "none"}.`);
    }
  } finally {
    client.close();
  }
  const counts = await tableCounts(url);
  for (const [table, n] of Object.entries(manifest.tables)) if (counts[table] !== n) problems.push(`${table} holds ${counts[table] ?? 0} rows; the manifest says ${n}.`);
  for (const table of Object.keys(counts)) if (!(table in manifest.tables)) problems.push(`${table} is not in the manifest.`);
  if (problems.length) return { manifest, problems };

  await migrateDatabase(url);
  const migrated = openDb(url);
  try {
    const report = await verifyAuditTrail(migrated.db);
    problems.push(...summarizeAudit(report).problems);
  } finally {
    migrated.client.close();
  }
  return { manifest, problems };
}

/** Everything wrong with a backup folder, in words; empty when it can be restored. Changes nothing in it. */
export async function checkBackup(dir: string): Promise<{ manifest: Manifest; problems: string[] }> {
  const scratch = await mkdtemp(join(tmpdir(), "twinleaf-check-"));
  try {
    return await stageAndCheck(dir, join(scratch, DATABASE_FILE));
  } finally {
    await rm(scratch, { recursive: true, force: true });
  }
}

/**
 * Restores a backup into a stopped instance: checks it whole first (checksums, integrity, foreign
 * keys, row counts, the audit chain against the manifest's head), then migrates a copy to this
 * version with WAL on, and only then puts it and the uploads in place. Refuses to overwrite an
 * existing database unless `replace` is set; the one replaced is kept beside it.
 */
export async function restoreBackup(opts: { dir: string; url: string; uploadsDir: string; replace?: boolean }): Promise<{ manifest: Manifest; keptAs: string | null }> {
  const target = localPath(opts.url);
  if (existsSync(target) && !opts.replace) throw new BackupError(`${target} already exists. Stop Twinleaf, then restore with --replace (the present database is kept beside it).`);
  // Staged beside the target, so putting it in place is one rename on the same disk.
  const staging = `${target}.restoring`;
  const { manifest, problems } = await stageAndCheck(opts.dir, staging);
  if (problems.length) {
    await removeDb(staging);
    throw new BackupError(`The backup in ${opts.dir} cannot be restored; nothing was changed:\n- ${problems.join("\n- ")}`);
  }

  let keptAs: string | null = null;
  if (existsSync(target)) {
    keptAs = `${target}.before-restore-${now().toISOString().replace(/[:.]/g, "-")}`;
    // A stopped instance has checkpointed its WAL; a leftover one goes with the file it belongs to.
    for (const ext of ["", "-wal", "-shm"]) if (existsSync(target + ext)) await rename(target + ext, keptAs + ext);
  }
  // A WAL left beside the staged file belongs to it and moves with it.
  for (const ext of ["", "-wal", "-shm"]) if (existsSync(staging + ext)) await rename(staging + ext, target + ext);

  const uploadsRoot = resolve(/*turbopackIgnore: true*/ opts.uploadsDir);
  await mkdir(uploadsRoot, { recursive: true });
  for (const file of Object.keys(manifest.files).filter((f) => f.startsWith(`${UPLOADS_FOLDER}/`))) {
    const to = resolve(uploadsRoot, ...file.slice(UPLOADS_FOLDER.length + 1).split("/"));
    if (!to.startsWith(uploadsRoot + sep)) throw new BackupError(`${file} would land outside the uploads folder.`);
    await mkdir(dirname(to), { recursive: true });
    await copyFile(join(opts.dir, ...file.split("/")), to);
  }
  return { manifest, keptAs };
}
