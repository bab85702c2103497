import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { certificates, finalTests } from "./dispatch";
import { events } from "./events";
import { serviceCases } from "./service";

/** One part replaced by the repair a revision records: side, position, the serial out and the serial in. */
export interface RevisionReplacement {
  side: "L" | "R";
  /** Model position code ("T", "B2"…) or "XO" for the crossover. */
  position: string;
  /** tweeter | midrange | bass | crossover */
  part: string;
  /** The serial taken out; null when nothing sat there before. */
  removed: string | null;
  fitted: string;
  /** When the new part was fitted (ms since the epoch, as JSON keeps it). */
  at: number;
}

/**
 * A revision of a pair's certificate, issued when the pair passes its final test again after a
 * repair. The original certificate (revision 1) stays in `certificates`; revisions count on from 2,
 * each with its own unguessable code, so the QR code of every revision ever printed still verifies.
 * One revision per passing re-test (unique final test); numbered once per certificate.
 */
export const certificateRevisions = sqliteTable(
  "certificate_revisions",
  {
    id: text("id").primaryKey(),
    certificateId: text("certificate_id")
      .notNull()
      .references(() => certificates.id),
    revision: integer("revision").notNull(),
    code: text("code").notNull().unique(),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    finalTestId: integer("final_test_id")
      .notNull()
      .unique()
      .references(() => finalTests.id),
    /** The line the owner reads on the verify page: "Right speaker's tweeter replaced on …". */
    repairLine: text("repair_line").notNull(),
    replaced: text("replaced", { mode: "json" }).$type<RevisionReplacement[]>().notNull(),
    /** When the last part of the repair was fitted. */
    repairedAt: integer("repaired_at", { mode: "timestamp_ms" }).notNull(),
    issuedAt: integer("issued_at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .unique()
      .references(() => events.id),
  },
  (t) => [
    uniqueIndex("certificate_revisions_number").on(t.certificateId, t.revision),
    index("certificate_revisions_case_idx").on(t.caseId),
    check("certificate_revisions_revision", sql`${t.revision} >= 2`),
    check("certificate_revisions_line", sql`length(trim(${t.repairLine})) BETWEEN 1 AND 300`),
  ],
);

/**
 * Every print of a certificate revision, kept like `certificate_prints`: one original per revision
 * (partial unique index), every other print a copy.
 */
export const certificateRevisionPrints = sqliteTable(
  "certificate_revision_prints",
  {
    id: text("id").primaryKey(),
    revisionId: text("revision_id")
      .notNull()
      .references(() => certificateRevisions.id),
    original: integer("original", { mode: "boolean" }).notNull(),
    actorId: text("actor_id").references(() => users.id),
    eventId: integer("event_id")
      .notNull()
      .unique()
      .references(() => events.id),
    printedAt: integer("printed_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    uniqueIndex("certificate_revision_prints_one_original").on(t.revisionId).where(sql`${t.original} = 1`),
    index("certificate_revision_prints_revision_idx").on(t.revisionId, t.printedAt),
  ],
);

export type CertificateRevision = typeof certificateRevisions.$inferSelect;
export type CertificateRevisionPrint = typeof certificateRevisionPrints.$inferSelect;
