"use server";
import { paths } from "@/lib/paths";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { parseLeafCsv } from "@/lib/veneer/csv";
import { clearDefect, flitchView, importLeafRows, measureLeaf, noteDefect } from "@/lib/veneer/flitches";
import { clearDefectSchema, defectSchema, importSchema, measureSchema } from "../schemas";

const page = paths.flitch;

export const measureLeafAction = guardedAction("veneer.work", measureSchema, async (input, user) => {
  const changed = await measureLeaf(getDb(), input.leafId, { lengthMm: input.lengthMm, widthMm: input.widthMm, usable: input.usable }, { id: user.id });
  return { ok: true, message: changed ? "Saved." : "No change.", revalidate: [page(input.flitch)] };
});

export const noteDefectAction = guardedAction("veneer.work", defectSchema, async ({ flitch, leafId, ...defect }, user) => {
  await noteDefect(getDb(), leafId, defect, { id: user.id });
  return { ok: true, message: defect.stillUsable ? "Defect noted; the leaf stays usable." : "Defect noted; the leaf is marked unusable.", revalidate: [page(flitch)] };
});

export const clearDefectAction = guardedAction("veneer.work", clearDefectSchema, async (input, user) => {
  await clearDefect(getDb(), input.defectId, input.reason, { id: user.id });
  return { ok: true, message: "Defect cleared. It stays in the history.", revalidate: [page(input.flitch)] };
});

export const importLeavesAction = guardedAction("veneer.work", importSchema, async (input, user) => {
  const db = getDb();
  const view = await flitchView(db, input.flitch);
  if (!view) throw new AppError(404, "That flitch is not in the register.");
  const parsed = parseLeafCsv(input.csv, { leafCount: view.intake.leafCount });
  if (!parsed.ok) {
    const lines = parsed.errors.slice(0, 20).map((e) => `Line ${e.line}${e.column ? ` (${e.column})` : ""}: ${e.message}`);
    const more = parsed.errors.length > 20 ? ` …and ${parsed.errors.length - 20} more.` : "";
    throw new AppError(400, `Nothing was saved: ${parsed.errors.length} row${parsed.errors.length === 1 ? "" : "s"} need attention.`, { csv: [...lines, ...(more ? [more] : [])] });
  }
  const result = await importLeafRows(db, view.item.id, parsed.rows, { id: user.id });
  return { ok: true, message: `Imported ${parsed.rows.length} rows: ${result.changed} leaves changed, ${result.defects} defects noted.`, revalidate: [page(input.flitch)] };
});
