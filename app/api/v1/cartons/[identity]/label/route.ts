import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { CARTON_LABEL_LAYOUT, cartonLabelData, renderCartonLabel } from "@/lib/dispatch";
import { recordLabelPrints } from "@/lib/labels/queries";
import { printPaths, segmentValue } from "@/lib/paths";
import { AppError } from "@/lib/auth/errors";

const query = z.object({
  /** Bars are sized in whole printer dots; thermal printers are usually 203 or 300 dpi. */
  printerDpi: z.enum(["203", "300", "600"], { error: "printerDpi is 203, 300 or 600." }).optional(),
});

/**
 * Prints a carton's 100 × 150 mm label: records the print (a second print is marked a reprint)
 * and sends the browser on (303) to the recorded print's PDF. A POST, from a button: opening a
 * link or reloading a page never prints. The label is made first, so an unknown carton or bad
 * data records nothing.
 */
export const POST = guardedRoute("cartons.print", { query }, async ({ params, query, user }) => {
  const db = getDb();
  const identity = segmentValue(params.identity);
  if (!identity) throw new AppError(404, "No carton with that serial.");
  const data = await cartonLabelData(db, identity);
  const printerDpi = query.printerDpi ? Number(query.printerDpi) : undefined;
  await renderCartonLabel(data, printerDpi ? { printerDpi } : {});
  // The label is packing's wherever it is printed: it goes on a packed carton.
  const [eventId] = await recordLabelPrints(db, { items: [{ id: data.cartonId, identity: data.carton, symbology: "gs1-128" }], layout: CARTON_LABEL_LAYOUT, actorId: user.id, station: "packing" });
  const href = printPaths.cartonLabelPrint(data.carton, eventId!, { printerDpi });
  return Response.json({ href }, { status: 303, headers: { location: href, "cache-control": "no-store" } });
});
