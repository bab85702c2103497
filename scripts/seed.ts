// Run with `tsx --import ./scripts/server-only.mjs` (see package.json), which lets lib/ queries load.
import { databaseUrl, openDb } from "../db/index";
import { migrateDatabase } from "../db/migrate";
import { formatSignIns } from "../db/seed/print";
import { SeedRefusedError, seedDemo } from "../db/seed/seed";

const url = databaseUrl();
try {
  await migrateDatabase(url);
  // Its own client rather than getDb()'s shared one, so it can be closed when the script ends.
  const { client, db } = openDb(url);
  try {
    const { created, users } = await seedDemo(db);
    const added = Object.entries(created).filter(([, n]) => n > 0).map(([k, n]) => `${n} ${k}`);
    console.log(added.length > 0 ? `seeded: ${added.join(", ")}` : "demo workshop already present: nothing added");
    console.log(`\nSign in with:\n${formatSignIns(users)}`);
  } finally {
    client.close();
  }
} catch (e) {
  if (e instanceof SeedRefusedError) console.error(e.message);
  else console.error(e);
  process.exitCode = 1;
}
