import "server-only";
import Papa from "papaparse";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { Containment } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { epcisDocumentForItems, type EpcisDocument, type EpcisOptions } from "@/lib/genealogy/epcis";
import { AFFECTED_STATE_WORDS, GROUP_LABEL } from "@/lib/vocabulary/containments";
import { kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import { affectedSerials } from "./queries";
import { containmentOrRefuse } from "./work";

export interface ExportDealer {
  id: string;
  code: string;
  name: string;
}

/** A dealer by its code (any case), or a 404 in words. */
export async function dealerOrRefuse(db: DbOrTx, codeText: string): Promise<ExportDealer> {
  const code = codeText.trim();
  const [row] = code ? await db.all<ExportDealer>(sql`SELECT id, code, name FROM dealers WHERE upper(code) = upper(${code}) LIMIT 1`) : [];
  if (!row) throw new AppError(404, `There is no dealer ${code.slice(0, 40) || "with that code"}.`, { dealer: [`There is no dealer ${code.slice(0, 40) || "with that code"}.`] });
  return row;
}

/** The containment and, when a dealer code is given, that dealer (each refused with a 404 in words). */
async function scopeOf(db: DbOrTx, code: string, dealerCode: string | undefined): Promise<{ c: Containment; dealer: ExportDealer | null }> {
  const c = await containmentOrRefuse(db, code);
  const dealer = dealerCode === undefined ? null : await dealerOrRefuse(db, dealerCode);
  return { c, dealer };
}

/** The CSV's columns, in order: a header a spreadsheet shows as it is. */
export const AFFECTED_CSV_FIELDS = [
  "Serial",
  "Kind",
  "Pair",
  "Where it is",
  "Containment state",
  "Item state",
  "Dealer code",
  "Dealer",
  "Owner",
  "Service case",
  "Last change",
] as const;

/** Header values are ASCII and the name is quoted: replace what would break either. */
const safeName = (text: string) => text.replace(/[^\x20-\x7e]|["\\/]/g, "_");

/**
 * The affected serials of a containment (one dealer's, with `dealerCode`) as CSV, written with
 * papaparse: words as the containment page shows them, the last change as an ISO instant, and
 * cells that a spreadsheet would run as a formula (an owner's name is typed by the public)
 * escaped by papaparse's `escapeFormulae`.
 */
export async function affectedCsv(db: DbOrTx, code: string, dealerCode?: string): Promise<{ filename: string; csv: string; rows: number }> {
  const { c, dealer } = await scopeOf(db, code, dealerCode);
  const rows = await affectedSerials(db, c.id, dealer ? { dealerCode: dealer.code } : {});
  const data = rows.map((r) => [
    r.serial,
    kindLabel(r.kind),
    r.pair ?? "",
    GROUP_LABEL[r.group],
    AFFECTED_STATE_WORDS[r.state],
    stateLabel(r.itemState),
    r.dealer?.code ?? "",
    r.dealer?.name ?? "",
    r.owner ?? "",
    r.caseCode ?? "",
    r.at.toISOString(),
  ]);
  const csv = Papa.unparse({ fields: [...AFFECTED_CSV_FIELDS], data }, { escapeFormulae: true, newline: "\r\n" });
  return { filename: safeName(`${c.code}${dealer ? `-${dealer.code}` : ""}-affected.csv`), csv: `${csv}\r\n`, rows: rows.length };
}

/**
 * The events of a containment's affected serials (one dealer's, with `dealerCode`) as an EPCIS 2.0
 * document: each serial's own events, its inspection and release by quality among them.
 */
export async function affectedEpcis(db: DbOrTx, code: string, dealerCode: string | undefined, opts: EpcisOptions): Promise<{ filename: string; doc: EpcisDocument }> {
  const { c, dealer } = await scopeOf(db, code, dealerCode);
  const ids = await db.all<{ item_id: string }>(sql`
    SELECT ci.item_id FROM containment_items ci LEFT JOIN dealers d ON d.id = ci.dealer_id
    WHERE ci.containment_id = ${c.id} ${dealer ? sql`AND d.id = ${dealer.id}` : sql``}`);
  const doc = await epcisDocumentForItems(db, ids.map((r) => r.item_id), opts);
  return { filename: safeName(`${c.code}${dealer ? `-${dealer.code}` : ""}-epcis.json`), doc };
}
