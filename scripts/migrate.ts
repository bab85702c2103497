import { databaseUrl } from "../db/index";
import { migrateDatabase } from "../db/migrate";

const url = databaseUrl();
await migrateDatabase(url);
console.log(`migrated ${url.replace(/authToken=[^&]+/, "authToken=…")}`);
