/**
 * Migrations 0019 and 0020 on a database written by the version before them: raw session ids in
 * the sessions table and one-time links in plain text in the outbox. After them no session id and
 * no token can be read back, and mail that was still waiting is delivered with its real link.
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { openDb } from "@/db";
import { migrateDatabase, MIGRATIONS_FOLDER } from "@/db/migrate";
import { mailSecrets, outbox, sessions } from "@/db/schema";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { deliverDue } from "@/lib/mail/sender";
import { inviteMail, resetMail } from "@/lib/mail/templates";
import type { MailTransport } from "@/lib/mail/transport";
import { migrate } from "drizzle-orm/libsql/migrator";

const BASE = "https://twinleaf.example.test";
const LAST_BEFORE = "0018_certificate_prints_history";

/** A copy of the migrations folder that ends at `lastTag`. */
function migrationsUpTo(lastTag: string): string {
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-mig-upto-"));
  cpSync(MIGRATIONS_FOLDER, dir, { recursive: true });
  const journalPath = join(dir, "meta", "_journal.json");
  const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
  const end = journal.entries.findIndex((e) => e.tag === lastTag);
  expect(end, `no migration ${lastTag}`).toBeGreaterThanOrEqual(0);
  journal.entries = journal.entries.slice(0, end + 1);
  writeFileSync(journalPath, JSON.stringify(journal));
  return dir;
}

describe("migrating a database written before sessions were hashed and links kept apart", () => {
  test("sessions end, tokens leave the outbox, and waiting mail still goes out with its link", async () => {
    const dir = mkdtempSync(join(tmpdir(), "twinleaf-mig-legacy-"));
    const path = join(dir, "legacy.db");
    const url = `file:${path}`;
    const rawSessionId = "rawsessionidthatthecookiecarries00000000";
    const sentToken = newToken();
    const waitingToken = newToken();
    const { client, db } = openDb(url);
    try {
      await client.execute("PRAGMA journal_mode = WAL");
      await migrate(db, { migrationsFolder: migrationsUpTo(LAST_BEFORE) });

      // What the older version wrote: a session under its raw id, and two mails with their links.
      const sentMail = resetMail({ name: "Hale Brook", link: `${BASE}/reset/${sentToken}`, expiresMinutes: 60 });
      const waitingMail = inviteMail({ name: "Ives Lorne", link: `${BASE}/invite/${waitingToken}`, invitedBy: "Admin", expiresHours: 72 });
      const later = Date.now() + 3600_000;
      await client.batch([
        "INSERT INTO users (id, email, name, password_hash) VALUES ('u1', 'hale@workshop.twinleaf.test', 'Hale Brook', 'x')",
        "INSERT INTO users (id, email, name) VALUES ('u2', 'ives@workshop.twinleaf.test', 'Ives Lorne')",
        { sql: "INSERT INTO sessions (id, user_id, expires_at, created_at) VALUES (?, 'u1', ?, ?)", args: [rawSessionId, Math.floor(later / 1000), Math.floor(Date.now() / 1000)] },
        { sql: "INSERT INTO auth_tokens (id, user_id, purpose, token_hash, expires_at) VALUES ('t1', 'u1', 'reset', ?, ?)", args: [hashToken(sentToken), later] },
        { sql: "INSERT INTO auth_tokens (id, user_id, purpose, token_hash, expires_at) VALUES ('t2', 'u2', 'invite', ?, ?)", args: [hashToken(waitingToken), later] },
        { sql: "INSERT INTO outbox (id, `to`, subject, text, html) VALUES (1, 'hale@workshop.twinleaf.test', ?, ?, ?)", args: [sentMail.subject, sentMail.text, sentMail.html] },
        { sql: "INSERT INTO outbox (id, `to`, subject, text, html) VALUES (2, 'ives@workshop.twinleaf.test', ?, ?, ?)", args: [waitingMail.subject, waitingMail.text, waitingMail.html] },
        { sql: "INSERT INTO mail_attempts (outbox_id, at, ok, detail) VALUES (1, ?, 1, '<sent@twinleaf.test>')", args: [Date.now()] },
      ]);
    } finally {
      client.close();
    }

    await migrateDatabase(url);

    const after = openDb(url);
    try {
      expect(await after.db.select().from(sessions)).toEqual([]);
      const rows = await after.db.select().from(outbox).orderBy(outbox.id);
      for (const row of rows) {
        expect(`${row.text}${row.html}`).not.toMatch(/\/(reset|invite)\/[A-Za-z0-9_-]{43}/);
        expect(row.text).toMatch(new RegExp(`/(reset|invite)/\\[\\[link:legacy-${row.id}\\]\\]`));
      }
      // Only the mail still waiting keeps its token, apart from the outbox.
      const kept = await after.db.select().from(mailSecrets);
      expect(kept).toHaveLength(1);
      expect(kept[0]!.outboxId).toBe(2);

      const delivered: { to: string; text: string; html: string }[] = [];
      const sink: MailTransport = { sendMail: async (m) => (delivered.push({ to: String(m.to), text: String(m.text), html: String(m.html) }), { messageId: "<legacy@twinleaf.test>" }) };
      expect(await deliverDue(after.db, sink)).toEqual({ sent: 1, failed: 0 });
      expect(delivered).toHaveLength(1);
      expect(delivered[0]!.to).toBe("ives@workshop.twinleaf.test");
      expect(delivered[0]!.text).toContain(`${BASE}/invite/${waitingToken}`);
      expect(delivered[0]!.html).toContain(`href="${BASE}/invite/${waitingToken}"`);
      expect(await after.db.select().from(mailSecrets).where(eq(mailSecrets.outboxId, 2))).toEqual([]);

      // Nor is anything left in the file's bytes once the log is folded in.
      await after.client.execute("PRAGMA wal_checkpoint(TRUNCATE)");
      const bytes = Buffer.concat([readFileSync(path), existsSync(`${path}-wal`) ? readFileSync(`${path}-wal`) : Buffer.alloc(0)]);
      for (const secret of [rawSessionId, sentToken, waitingToken]) expect(bytes.includes(secret), secret).toBe(false);
    } finally {
      after.client.close();
    }
  });

  test("the sessions table refuses a raw id: only a SHA-256 in hex can be stored", async () => {
    const url = `file:${join(mkdtempSync(join(tmpdir(), "twinleaf-mig-check-")), "check.db")}`;
    await migrateDatabase(url);
    const { client } = openDb(url);
    try {
      await client.execute("INSERT INTO users (id, email, name) VALUES ('u1', 'a@workshop.twinleaf.test', 'A')");
      const insert = (id: string) => client.execute({ sql: "INSERT INTO sessions (id, user_id, expires_at, created_at) VALUES (?, 'u1', 1, 1)", args: [id] });
      await expect(insert("abcdefghijklmnopqrstuvwxyz23456789abcdef")).rejects.toThrow(/CHECK constraint failed/);
      await expect(insert(hashToken("x").toUpperCase())).rejects.toThrow(/CHECK constraint failed/);
      await expect(insert(hashToken("x"))).resolves.toBeDefined();
    } finally {
      client.close();
    }
  });
});
