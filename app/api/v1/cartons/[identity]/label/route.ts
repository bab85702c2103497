import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { CARTON_LABEL_LAYOUT, cartonLabelData, renderCartonLabel } from "@/lib/dispatch";
import { recordLabelPrints } from "@/lib/labels/queries";

const query = z.object({
  /** Bars are sized in whole printer dots; thermal printers are usually 203 or 300 dpi. */
  printerDpi: z.enum(["203", "300", "600"], { error: "printerDpi is 203, 300 or 600." }).optional(),
});

/**
 * A carton's 100 × 150 mm label as a PDF. The label is made first, so an unknown carton or bad
 * data records nothing; then the print is recorded (a second print is marked a reprint).
 */
export const GET = guardedRoute("labels.print", { query }, async ({ params, query, user }) => {
  const db = getDb();
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const data = await cartonLabelData(db, identity);
  const pdf = await renderCartonLabel(data, query.printerDpi ? { printerDpi: Number(query.printerDpi) } : {});
  await recordLabelPrints(db, { items: [{ id: data.cartonId, identity: data.carton, symbology: "gs1-128" }], layout: CARTON_LABEL_LAYOUT, actorId: user.id, station: "packing" });
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="carton-label-${data.carton}.pdf"`,
      "cache-control": "private, no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
