import { z } from "zod";
import { getDb } from "@/db";
import { homeStation } from "@/lib/areas";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { itemsWithNames } from "@/lib/genealogy/queries";
import { SYMBOLOGIES, type Symbology } from "@/lib/labels/barcodes";
import { defaultSymbology, labelSpecFor } from "@/lib/labels/for-item";
import { recordLabelPrints } from "@/lib/labels/queries";
import { renderLabelSheet, SHEET_LAYOUTS, type SheetLayout } from "@/lib/labels/sheets";

const labelRequest = z.object({
  identities: z.array(z.string().trim().min(1).max(64, "A serial is at most 64 characters.")).min(1, "Name at least one serial.").max(240, "At most 240 labels at once (10 sheets)."),
  layout: z.enum(SHEET_LAYOUTS as [SheetLayout, ...SheetLayout[]], { error: "layout is a4-3x8 or thermal-100x50." }),
  symbology: z.enum(SYMBOLOGIES as [Symbology, ...Symbology[]]).optional(),
  startAt: z.number().int().min(0).max(23).default(0),
  /** Bars are sized in whole printer dots; thermal printers are usually 203 or 300 dpi. */
  printerDpi: z.union([z.literal(203), z.literal(300), z.literal(600)], { error: "printerDpi is 203, 300 or 600." }).optional(),
});

/**
 * Prints labels as a PDF and records each print (a reprint says so). Everything is checked and
 * rendered first, so bad input writes nothing.
 */
export const POST = guardedRoute("labels.print", { body: labelRequest }, async ({ body, user }) => {
  const db = getDb();
  const baseUrl = await appBaseUrl();
  const rows = new Map((await itemsWithNames(db, body.identities)).map((r) => [r.item.identity, r]));
  const missing = body.identities.filter((identity) => !rows.has(identity));
  if (missing.length) throw new AppError(404, `Not registered: ${missing.join(", ")}.`);
  // In the order asked for (a sheet prints left to right, top to bottom).
  const details = body.identities.map((identity) => rows.get(identity)!);
  const specs = details.map((d) => labelSpecFor(d, body.symbology ?? defaultSymbology(d.item.kind), baseUrl));
  const pdf = await renderLabelSheet(specs, body.layout, { startAt: body.startAt, ...(body.printerDpi ? { printerDpi: body.printerDpi } : {}) });
  await recordLabelPrints(db, {
    items: details.map((d, i) => ({ id: d.item.id, identity: d.item.identity, symbology: specs[i]!.barcode.symbology })),
    layout: body.layout,
    actorId: user.id,
    station: homeStation(user.roles),
  });
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="twinleaf-labels-${body.layout}.pdf"`,
      "x-content-type-options": "nosniff",
    },
  });
});
