import { mkdtempSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { openClient } from "@/db";
import { migrateDatabase, MIGRATIONS_FOLDER } from "@/db/migrate";

const TABLES = ["auth_tokens", "batch_units", "carton_locations", "carton_ssccs", "case_findings", "case_reservations", "certificate_prints", "certificate_revision_prints", "certificate_revisions", "certificates", "containment_items", "containment_notices", "containments", "crossover_parts", "dealers", "events", "final_tests", "finishes", "flitches", "holdings", "item_model_versions", "items", "leaf_allocations", "leaf_defects", "limit_hits", "links", "machine_tokens", "mail_attempts", "mail_claims", "mail_secrets", "matched_sets", "model_crossover_positions", "model_positions", "model_tolerances", "model_trim_positions", "model_versions", "models", "nonconformances", "outbox", "owner_consent_links", "owner_consents", "owner_registrations", "owners", "ownerships", "packing_items", "payment_requests", "payments", "process_specs", "quotes", "refunds", "response_bands", "responses", "route_corrections", "route_records", "route_starts", "search_keys", "search_people", "search_people_config", "search_people_content", "search_people_data", "search_people_docsize", "search_people_idx", "search_text", "search_text_config", "search_text_content", "search_text_data", "search_text_docsize", "search_text_idx", "serial_sequences", "service_cases", "sessions", "set_members", "shipment_details", "ts_params", "unit_batches", "uploads", "user_roles", "users", "veneer_leaves"];

describe("migrations on an empty database", () => {
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-mig-"));
  // A folder that does not exist yet: the client must create it (createClient alone throws).
  const url = `file:${join(dir, "nested", "empty.db")}`;

  test("every committed migration applies to an empty file, and a second run changes nothing", async () => {
    await migrateDatabase(url);
    await migrateDatabase(url);
    const client = openClient(url);
    try {
      const tables = (await client.execute("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name")).rows.map((r) => r.name);
      expect(tables).toEqual(TABLES);
      const applied = await client.execute("SELECT count(*) AS n FROM __drizzle_migrations");
      const files = readdirSync(MIGRATIONS_FOLDER).filter((f) => f.endsWith(".sql"));
      expect(Number(applied.rows[0]!.n)).toBe(files.length);
      const triggers = (await client.execute("SELECT name FROM sqlite_master WHERE type = 'trigger' ORDER BY name")).rows.map((r) => r.name);
      expect(triggers).toEqual(expect.arrayContaining(["events_no_delete", "events_no_update"]));
    } finally {
      client.close();
    }
  });

  test("the file is in WAL mode, foreign keys are enforced and the busy wait is set on every connection", async () => {
    const client = openClient(url);
    try {
      expect((await client.execute("PRAGMA journal_mode")).rows[0]!.journal_mode).toBe("wal");
      expect(Number((await client.execute("PRAGMA foreign_keys")).rows[0]!.foreign_keys)).toBe(1);
      expect(Number((await client.execute("PRAGMA busy_timeout")).rows[0]!.timeout)).toBeGreaterThan(0);
      expect((await client.execute("PRAGMA foreign_key_check")).rows).toEqual([]);
      await expect(client.execute("INSERT INTO user_roles (user_id, role) VALUES ('no-such-user', 'lab')")).rejects.toThrow(/FOREIGN KEY/);
    } finally {
      client.close();
    }
  });
});
