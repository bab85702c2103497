// A second server process for tests/integration/limits.test.ts: reserves `count` tries at once
// under one key against the same database file, and prints how many were let through.
import { openDb } from "@/db";
import { reserve } from "@/lib/limits";

const [key, count, max] = [process.argv[2]!, Number(process.argv[3]), Number(process.argv[4])];
const { db, client } = openDb(process.env.DATABASE_URL);
const now = new Date();
const results = await Promise.all(Array.from({ length: count }, () => reserve(db, [{ key, windowMs: 60_000, max }], { now })));
console.log(JSON.stringify({ allowed: results.filter((r) => r.ok).length }));
client.close();
