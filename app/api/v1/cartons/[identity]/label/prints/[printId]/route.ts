import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { CARTON_LABEL_LAYOUT, cartonLabelData, renderCartonLabel } from "@/lib/dispatch";
import { LABEL_PRINT_OPEN_FOR_MS, labelPrintOpenable } from "@/lib/labels/queries";
import { segmentValue } from "@/lib/paths";

const query = z.object({
  printerDpi: z.enum(["203", "300", "600"], { error: "printerDpi is 203, 300 or 600." }).optional(),
});

const GONE = `This print is not open to you: a print can be opened again only by the person who made it, for ${LABEL_PRINT_OPEN_FOR_MS / 60_000} minutes. Print the carton label again.`;

/**
 * The PDF of one recorded print of a carton label, for the person who printed it, for a few
 * minutes. Reading it records nothing: printing is the POST.
 */
export const GET = guardedRoute("cartons.print", { query }, async ({ params, query, user }) => {
  const db = getDb();
  const identity = segmentValue(params.identity);
  const printId = Number(segmentValue(params.printId));
  if (!identity) throw new AppError(404, "No carton with that serial.");
  const data = await cartonLabelData(db, identity);
  const open = Number.isSafeInteger(printId) && printId > 0 && (await labelPrintOpenable(db, { eventId: printId, itemId: data.cartonId, layout: CARTON_LABEL_LAYOUT, actorId: user.id }));
  if (!open) throw new AppError(404, GONE);
  const pdf = await renderCartonLabel(data, query.printerDpi ? { printerDpi: Number(query.printerDpi) } : {});
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="carton-label-${data.carton}.pdf"`,
      "cache-control": "private, no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
