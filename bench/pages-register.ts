/**
 * The register the pages benchmark serves: the demo workshop (its people for every role, its
 * reference data and its two years of history, written through the app's own write functions,
 * so there are cabinet pairs with route records, service cases, owners and containments) plus
 * the shared synthetic register of bench/register.ts (≥ 1,000,000 items), copied in with bulk SQL.
 *
 * The demo's history refuses to run on a register that already holds a pair, and the synthetic
 * builder refuses to share its model and dealer codes with a seeded one, so each is written to a
 * file of its own and the synthetic one is then copied into the seeded one: its model, finishes
 * and dealers are mapped to the seeded rows of the same code, and every link points at the
 * seeded log's first event (the builder's links point at one shared event too).
 */
import { existsSync, renameSync, rmSync } from "node:fs";
import { performance } from "node:perf_hooks";
import { createClient, type Client } from "@libsql/client";
import { openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { seedDemo } from "@/db/seed/seed";
import { buildRegister, SEARCH_SHAPE, type Built, type RegisterShape } from "./register";

/** The search benchmark's register: over 1,000,000 items. */
export const PAGES_SHAPE: RegisterShape = SEARCH_SHAPE;
export const MIN_ITEMS = 1_000_000;

/** What the benchmark keeps of the build (the pair list is long; a sample is enough to time). */
export interface PagesRegister {
  items: number;
  pairIds: string[];
  bigLotIdentity: string;
  seconds: number;
}

const ITEM_COLS = "id, kind, identity, model_id, finish_id, part_type, state, dealer_id, attrs, created_at, created_event_id";

async function merge(client: Client, rawFile: string): Promise<{ renamed: number }> {
  // One connection, used strictly in sequence: ATTACH and the temporary tables live on it.
  await client.execute("PRAGMA synchronous = OFF");
  await client.execute("PRAGMA cache_size = -524288");
  await client.execute({ sql: "ATTACH DATABASE ? AS b", args: [rawFile] });
  // Each statement commits on its own: the file is scratch until seedAndMerge renames it into
  // place. (An explicit BEGIN … COMMIT here was found already ended by the time COMMIT came.)
  try {
    // The synthetic register's own dealers and owners (beside the seed's) come along as they are.
    await client.execute(
      "INSERT INTO main.dealers (id, code, name, city, country, email) SELECT id, code, name, city, country, email FROM b.dealers WHERE code NOT IN (SELECT code FROM main.dealers)",
    );
    await client.execute("INSERT INTO main.owners (id, name, email, town, country) SELECT id, name, email, town, country FROM b.owners");
    for (const table of ["models", "finishes", "dealers"]) {
      await client.execute(`CREATE TEMP TABLE map_${table} AS SELECT s.id AS bid, m.id AS mid FROM b.${table} s JOIN main.${table} m ON m.code = s.code`);
      const [row] = (await client.execute(`SELECT (SELECT count(*) FROM b.${table}) - (SELECT count(*) FROM map_${table}) AS missing`)).rows;
      if (Number(row!.missing) > 0) throw new Error(`bench: ${row!.missing} of the synthetic register's ${table} have no seeded row of the same code`);
    }
    // The demo's history and the synthetic years may both issue a serial (the builder's last year
    // meets the history's first): the synthetic one takes a suffix, in its item, links and holdings alike.
    await client.execute(
      "CREATE TEMP TABLE renamed AS SELECT s.id AS id, s.identity || '-SYN' AS identity FROM b.items s JOIN main.items m ON m.identity = s.identity",
    );
    await client.execute("CREATE UNIQUE INDEX temp.renamed_id ON renamed (id)");
    await client.execute(`
      INSERT INTO main.items (${ITEM_COLS})
      SELECT s.id, s.kind, coalesce(r.identity, s.identity), mm.mid, fm.mid, s.part_type, s.state, dm.mid, s.attrs, s.created_at, NULL
      FROM b.items s
      LEFT JOIN renamed r ON r.id = s.id
      LEFT JOIN map_models mm ON mm.bid = s.model_id
      LEFT JOIN map_finishes fm ON fm.bid = s.finish_id
      LEFT JOIN map_dealers dm ON dm.bid = s.dealer_id`);
    await client.execute(`
      INSERT INTO main.links (parent_id, parent_kind, parent_identity, child_id, position, shared, started_at, ended_at, fit_event_id, remove_event_id)
      SELECT l.parent_id, l.parent_kind, coalesce(r.identity, l.parent_identity), l.child_id, l.position, l.shared, l.started_at, l.ended_at,
             e.id, CASE WHEN l.ended_at IS NULL THEN NULL ELSE e.id END
      FROM b.links l
      LEFT JOIN renamed r ON r.id = l.parent_id
      CROSS JOIN (SELECT min(id) AS id FROM main.events) e
      ORDER BY l.id`);
    await client.execute(`
      INSERT INTO main.holdings (item_id, holder_id, holder_kind, holder_identity, paths)
      SELECT h.item_id, h.holder_id, h.holder_kind, coalesce(r.identity, h.holder_identity), h.paths
      FROM b.holdings h LEFT JOIN renamed r ON r.id = h.holder_id`);
    const renamed = Number((await client.execute("SELECT count(*) AS n FROM renamed")).rows[0]!.n);
    return { renamed };
  } finally {
    await client.execute("DETACH DATABASE b").catch(() => {});
  }
}

/**
 * Builds the benchmark's register in `file` (which must not exist yet): the seeded demo workshop
 * with the synthetic register copied in. A scratch file beside it holds the synthetic register
 * while it is built and is removed afterwards.
 */
export async function buildPagesRegister(file: string, shape: RegisterShape = PAGES_SHAPE): Promise<PagesRegister> {
  const t0 = performance.now();
  const rawFile = `${file}.synthetic`;
  for (const f of [file, rawFile]) if (existsSync(f)) throw new Error(`bench: ${f} already exists`);
  const rawUrl = `file:${rawFile}`;
  await migrateDatabase(rawUrl);
  console.log(`Building the synthetic register (${shape.years} years of ${shape.pairsPerYear.toLocaleString("en")} pairs)…`);
  const built: Built = await buildRegister(rawUrl, shape);
  const items = await seedAndMerge(file, rawFile);
  for (const suffix of ["", "-wal", "-shm"]) rmSync(rawFile + suffix, { force: true });
  return { items, pairIds: built.pairIds, bigLotIdentity: built.bigLotIdentity, seconds: (performance.now() - t0) / 1000 };
}

/** Seeds the demo workshop in `file` and copies the synthetic register of `rawFile` into it; returns the items counted. */
export async function seedAndMerge(file: string, rawFile: string): Promise<number> {
  console.log("Seeding the demo workshop and its history through the app's own functions…");
  const seededFile = `${file}.seeding`;
  const url = `file:${seededFile}`;
  await migrateDatabase(url);
  const ts = performance.now();
  const { client: seedClient, db } = openDb(url);
  try {
    await seedDemo(db);
  } finally {
    seedClient.close();
  }
  console.log(`  seeded in ${((performance.now() - ts) / 1000).toFixed(1)} s`);

  console.log("Copying the synthetic register in…");
  const tm = performance.now();
  // A plain client, not the app's: the copy is one connection's ATTACH and temporary tables, and
  // the app's client runs each lone write in a transaction (and on a connection) of its own.
  const client = createClient({ url });
  let items: number;
  try {
    const { renamed } = await merge(client, rawFile);
    items = Number((await client.execute("SELECT count(*) AS n FROM items")).rows[0]!.n);
    const broken = await client.execute("PRAGMA foreign_key_check");
    if (broken.rows.length > 0) throw new Error(`bench: foreign key check failed after the copy: ${JSON.stringify(broken.rows.slice(0, 5))}`);
    await client.execute("PRAGMA wal_checkpoint(TRUNCATE)");
    console.log(`  ${items.toLocaleString("en")} items in all (${renamed} synthetic serials renamed) in ${((performance.now() - tm) / 1000).toFixed(1)} s`);
  } finally {
    client.close();
  }
  if (items < MIN_ITEMS) throw new Error(`bench: only ${items} items; the register must hold at least ${MIN_ITEMS}`);
  for (const suffix of ["", "-wal", "-shm"]) if (existsSync(seededFile + suffix)) renameSync(seededFile + suffix, file + suffix);
  return items;
}

