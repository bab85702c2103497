import { randomUUID } from "node:crypto";
import { eq, inArray, sql } from "drizzle-orm";
import type { Db } from "@/db";
import { dealers, finishes, modelCrossoverPositions, modelPositions, modelTolerances, models, modelTrimPositions, userRoles, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { appendEvent } from "@/lib/events/queries";
import { DEMO_PASSWORD, SEED_DEALERS, SEED_FINISHES, SEED_MODELS, SEED_USERS } from "./data";
import { referenceDate, seedHistory } from "./history";
import { atTime, now as clockNow } from "@/lib/clock";
import { ensureDefaultSpecs } from "@/lib/route/specs";
import { ensurePackingLists } from "@/lib/dispatch/packing-list";
import { ensureModelVersions } from "@/lib/workshop/models";
import { packingItems } from "@/db/schema/dispatch";
import { gs1CheckDigit, isValidGtin } from "@/lib/serials";

export { gs1CheckDigit };

/** The seed's GTINs are checked with the register's own GS1 code (tested against GS1's examples in lib/serials). */
export function isValidGtin14(gtin: string): boolean {
  return gtin.length === 14 && isValidGtin(gtin);
}

/** The database holds real users: seeding demo sign-ins with a published password would open it up. */
export class SeedRefusedError extends Error {
  override name = "SeedRefusedError";
}

export interface SeedCounts {
  models: number;
  modelPositions: number;
  modelTolerances: number;
  finishes: number;
  dealers: number;
  users: number;
  userRoles: number;
  /** Pairs of the invented production history (zero once any pair exists). */
  pairs: number;
}

export interface SeedResult {
  /** What this run added; all zero when the demo workshop was already there. */
  created: SeedCounts;
  /** The demo sign-ins as they stand after the run (all take DEMO_PASSWORD unless someone changed it). */
  users: { email: string; roles: Role[] }[];
}

const SEED_EVENT = { actorId: null, station: "seed" } as const;

/**
 * Writes the invented demo workshop. Only reference data is inserted here directly: models with
 * their positions and tolerances (and their first route and packing list), finishes, dealers and
 * the demo users, each with its creation event. Everything that happens in the workshop goes
 * through the register's own write functions, in ./history. Idempotent: records are matched on their unique code or
 * e-mail and only the missing ones are inserted; a model's positions and tolerances come with the
 * model, so an existing model is left as it is. Refuses, writing nothing, when any non-demo user exists.
 * `months` shortens the history (two years by default) for tests that need less of it.
 */
export async function seedDemo(db: Db, options: { history?: boolean; months?: number } = {}): Promise<SeedResult> {
  const now = new Date();
  // With its history, the workshop's reference data is dated before the history's first day, so
  // the log reads in order (models and people before the work); without, it is dated now.
  const dated = <T>(fn: () => Promise<T>) => (options.history === false ? fn() : atTime(referenceDate(now, options.months), fn));
  for (const m of SEED_MODELS) {
    if (!isValidGtin14(m.pairGtin)) throw new Error(`seed data: model ${m.code} has an invalid GTIN-14 ${m.pairGtin}`);
  }
  // Hashing is deliberately slow; done before the transaction so its write lock is held briefly.
  const hashes = new Map(
    await Promise.all(SEED_USERS.map(async (u) => [u.email, await hashPassword(DEMO_PASSWORD)] as const)),
  );

  const created: SeedCounts = { models: 0, modelPositions: 0, modelTolerances: 0, finishes: 0, dealers: 0, users: 0, userRoles: 0, pairs: 0 };

  const seededUsers = await dated(() => db.transaction(async (tx) => {
    // Checked inside the transaction so no real user can appear between the check and the writes.
    const [real] = await tx.select({ n: sql<number>`count(*)` }).from(users).where(eq(users.demo, false));
    if ((real?.n ?? 0) > 0) {
      throw new SeedRefusedError(
        `Refusing to seed the demo workshop: the database holds ${real!.n} non-demo user(s). ` +
          "The demo seed only runs on an empty database or one that holds demo data alone.",
      );
    }

    for (const { positions, tolerances, trim = [], ...model } of SEED_MODELS) {
      const [row] = await tx
        .insert(models)
        .values({ id: randomUUID(), ...model })
        .onConflictDoNothing({ target: models.code })
        .returning({ id: models.id });
      if (!row) continue;
      await tx.insert(modelPositions).values(positions.map((p) => ({ modelId: row.id, ...p })));
      await tx.insert(modelTolerances).values(tolerances.map((t) => ({ modelId: row.id, ...t })));
      if (trim.length) await tx.insert(modelTrimPositions).values(trim.map((t) => ({ modelId: row.id, ...t })));
      created.models++;
      created.modelPositions += positions.length;
      created.modelTolerances += tolerances.length;
      await appendEvent(tx, {
        ...SEED_EVENT, type: "model.created", subjectKind: "model", subjectId: row.id,
        data: { ...model, positions, tolerances, trim },
      });
    }
    // Every model gets the workshop's usual cabinet route as its first version, and a packing list;
    // the floor-stander also ships with its spikes, a boxed accessory with its own (invented) GTIN
    // that the packer scans in.
    await ensureDefaultSpecs(tx);
    if ((await ensurePackingLists(tx)) > 0) {
      const [tower] = await tx.select({ id: models.id }).from(models).where(eq(models.code, "TB3"));
      if (tower) {
        const [last] = await tx.select({ n: sql<number>`max(position)` }).from(packingItems).where(eq(packingItems.modelId, tower.id));
        await tx.insert(packingItems).values({ modelId: tower.id, position: Number(last?.n ?? 0) + 1, label: "Floor spikes and cups (8 each)", code: "09527730009000" }).onConflictDoNothing();
      }
    }
    // Each model's one crossover board, and its spec as version 1, which the history's pairs are made under.
    for (const m of await tx.select({ id: models.id }).from(models)) await tx.insert(modelCrossoverPositions).values({ modelId: m.id, position: "XO", count: 1 }).onConflictDoNothing();
    await ensureModelVersions(tx);

    for (const finish of SEED_FINISHES) {
      const [row] = await tx
        .insert(finishes)
        .values({ id: randomUUID(), ...finish })
        .onConflictDoNothing({ target: finishes.code })
        .returning({ id: finishes.id });
      if (!row) continue;
      created.finishes++;
      await appendEvent(tx, { ...SEED_EVENT, type: "finish.created", subjectKind: "finish", subjectId: row.id, data: { ...finish } });
    }

    for (const dealer of SEED_DEALERS) {
      const [row] = await tx
        .insert(dealers)
        .values({ id: randomUUID(), ...dealer })
        .onConflictDoNothing({ target: dealers.code })
        .returning({ id: dealers.id });
      if (!row) continue;
      created.dealers++;
      await appendEvent(tx, { ...SEED_EVENT, type: "dealer.created", subjectKind: "dealer", subjectId: row.id, data: { ...dealer } });
    }

    for (const user of SEED_USERS) {
      const [row] = await tx
        .insert(users)
        .values({ id: randomUUID(), email: user.email, name: user.name, passwordHash: hashes.get(user.email)!, demo: true, createdAt: clockNow() })
        .onConflictDoNothing({ target: users.email })
        .returning({ id: users.id });
      if (!row) continue;
      await tx.insert(userRoles).values(user.roles.map((role) => ({ userId: row.id, role })));
      created.users++;
      created.userRoles += user.roles.length;
      // The hash stays out of the event log.
      await appendEvent(tx, {
        ...SEED_EVENT, type: "user.created", subjectKind: "user", subjectId: row.id,
        data: { email: user.email, name: user.name, roles: user.roles, demo: true },
      });
    }

    // Read back rather than echo the seed data: an existing demo user may hold other roles by now.
    const emails = SEED_USERS.map((u) => u.email);
    const rows = await tx
      .select({ email: users.email, role: userRoles.role })
      .from(users)
      .leftJoin(userRoles, eq(userRoles.userId, users.id))
      .where(inArray(users.email, emails));
    return emails.map((email) => ({
      email,
      roles: rows.filter((r) => r.email === email && r.role !== null).map((r) => r.role as Role).sort(),
    }));
  }));

  // The production history, after the reference data has committed, through the register's own
  // write functions (one transaction each). `history: false` seeds the reference alone.
  if (options.history !== false) created.pairs = (await seedHistory(db, { now, months: options.months })).pairs;

  return { created, users: seededUsers };
}
