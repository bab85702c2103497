import { join } from "node:path";
import { eq, sql } from "drizzle-orm";
import type { SQLiteTable } from "drizzle-orm/sqlite-core";
import { describe, expect, onTestFinished, test } from "vitest";
import { getDb, openDb, type Db } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { dealers, events, finishes, modelPositions, modelTolerances, models, userRoles, users } from "@/db/schema";
import { DEMO_PASSWORD, SEED_DEALERS, SEED_FINISHES, SEED_MODELS, SEED_USERS } from "@/db/seed/data";
import { formatSignIns } from "@/db/seed/print";
import { gs1CheckDigit, isValidGtin14, seedDemo, SeedRefusedError } from "@/db/seed/seed";
import { verifyPassword } from "@/lib/auth/password";
import { ROLES } from "@/lib/auth/roles";
import { failureText } from "./helpers";

async function tableCounts(db: Db) {
  const count = async (table: SQLiteTable) => {
    const [row] = await db.select({ n: sql<number>`count(*)` }).from(table);
    return row?.n ?? -1;
  };
  return {
    models: await count(models),
    modelPositions: await count(modelPositions),
    modelTolerances: await count(modelTolerances),
    finishes: await count(finishes),
    dealers: await count(dealers),
    users: await count(users),
    userRoles: await count(userRoles),
    events: await count(events),
  };
}

/** A second migrated database in this file's temp folder, for cases that need a different start. */
async function freshDb(name: string) {
  const url = `file:${join(process.env.TWINLEAF_TEST_DIR!, `${name}.db`)}`;
  await migrateDatabase(url);
  return openDb(url);
}

describe("the demo seed", () => {
  // These three share the file's database and run in order: empty → seeded → seeded again.
  test("seeding an empty database creates one demo user per role whose password verifies", async () => {
    const db = getDb();
    const { created, users: signIns } = await seedDemo(db, { history: false });

    const positions = SEED_MODELS.reduce((n, m) => n + m.positions.length, 0);
    const tolerances = SEED_MODELS.reduce((n, m) => n + m.tolerances.length, 0);
    expect(created).toEqual({
      models: SEED_MODELS.length, modelPositions: positions, modelTolerances: tolerances,
      finishes: SEED_FINISHES.length, dealers: SEED_DEALERS.length, users: ROLES.length, userRoles: ROLES.length, pairs: 0,
    });
    // One event per created record (and per model its first route version, and a first trim-part
    // route for a model with trim positions), from the seed station and no actor.
    const seedEvents = await db.select().from(events);
    const trimRoutes = SEED_MODELS.filter((m) => m.trim?.length).length;
    expect(seedEvents).toHaveLength(2 * SEED_MODELS.length + trimRoutes + SEED_FINISHES.length + SEED_DEALERS.length + ROLES.length);
    expect(seedEvents.every((e) => e.station === "seed" && e.actorId === null)).toBe(true);
    expect(seedEvents.filter((e) => e.type === "user.created")).toHaveLength(ROLES.length);
    expect(JSON.stringify(seedEvents)).not.toMatch(/\$argon2/);

    for (const role of ROLES) {
      const email = `${role}@demo.twinleaf.test`;
      const [user] = await db.select().from(users).where(eq(users.email, email));
      expect(user, email).toBeDefined();
      expect(user!.demo).toBe(true);
      expect(user!.active).toBe(true);
      const held = await db.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, user!.id));
      expect(held.map((r) => r.role)).toEqual([role]);
      expect(await verifyPassword(user!.passwordHash!, DEMO_PASSWORD)).toBe(true);
      expect(await verifyPassword(user!.passwordHash!, "twinleaf-demO")).toBe(false);
      expect(signIns).toContainEqual({ email, roles: [role] });
    }

    const [pw2] = await db.select().from(models).where(eq(models.code, "PW2"));
    const pw2Positions = await db.select().from(modelPositions).where(eq(modelPositions.modelId, pw2!.id));
    expect(pw2Positions.map((p) => `${p.position}:${p.partType}`).sort()).toEqual(["B:bass", "T:tweeter"]);
  });

  test("a second run adds nothing", async () => {
    const db = getDb();
    const before = await tableCounts(db);
    const { created, users: signIns } = await seedDemo(db, { history: false });
    expect(Object.values(created).every((n) => n === 0)).toBe(true);
    expect(await tableCounts(db)).toEqual(before);
    expect(signIns).toHaveLength(ROLES.length);
  });

  test("a run after one record went missing inserts only that record", async () => {
    const db = getDb();
    const before = await tableCounts(db);
    await db.delete(dealers).where(eq(dealers.code, SEED_DEALERS[0]!.code));
    const { created } = await seedDemo(db, { history: false });
    expect(created).toMatchObject({ dealers: 1, models: 0, finishes: 0, users: 0 });
    expect(await tableCounts(db)).toEqual({ ...before, events: before.events + 1 });
  });

  test("with a non-demo user present the seed refuses and writes nothing", async () => {
    // A database of its own: on an already seeded one, "writes nothing" would hold trivially.
    const { client, db } = await freshDb("refuse");
    onTestFinished(() => client.close());
    await db.insert(users).values({ id: "real-1", email: "someone@workshop.test", name: "Real Person", demo: false });
    const before = await tableCounts(db);

    await expect(seedDemo(db, { history: false })).rejects.toBeInstanceOf(SeedRefusedError);
    expect(await failureText(() => seedDemo(db, { history: false }))).toMatch(/non-demo user/);
    expect(await tableCounts(db)).toEqual(before);
    expect(before).toMatchObject({ users: 1, models: 0, events: 0 });
  });

  test("the sign-in table lists each e-mail with its role and the password", () => {
    const lines = formatSignIns(SEED_USERS).split("\n");
    expect(lines).toHaveLength(2 + ROLES.length);
    expect(lines[2]).toMatch(/^veneer@demo\.twinleaf\.test\s+veneer\s+twinleaf-demo$/);
  });
});

describe("GS1 check digits", () => {
  // GS1 General Specifications, §7.9.1 (standard check digit calculation), worked example:
  // 629104150021 → 3. The others and the valid GTIN-14s are from docs/REFERENCES.md, § GS1.
  test.each([
    ["629104150021", 3],
    ["730001100001", 7],
    ["890400021003", 7],
    ["0952123454321", 3],
    ["9501234567890", 3],
    ["0345312000001", 1],
  ])("%s → %i", (data, check) => {
    expect(gs1CheckDigit(data)).toBe(check);
  });

  test("a GTIN-14 with one digit changed is rejected", () => {
    expect(isValidGtin14("09521234543213")).toBe(true);
    expect(isValidGtin14("09521234543214")).toBe(false);
    expect(isValidGtin14("09521234534213")).toBe(false);
    expect(isValidGtin14("0952123454321")).toBe(false);
  });

  // Reads the models the seed tests above wrote into this file's database.
  test("every seeded GTIN carries a correct check digit and is unique", async () => {
    const rows = await getDb().select({ gtin: models.pairGtin }).from(models);
    expect(rows).toHaveLength(SEED_MODELS.length);
    for (const { gtin } of rows) expect(isValidGtin14(gtin), gtin).toBe(true);
    expect(new Set(rows.map((r) => r.gtin)).size).toBe(rows.length);
  });
});
