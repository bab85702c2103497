import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { deliveryNotePdf } from "@/lib/dispatch";
import { segmentValue } from "@/lib/paths";

/**
 * A shipment's delivery note as a PDF, to open or print again. It only reads: the note is the
 * register's record of the shipment, made the same way as the copy attached to the dealer's mail.
 */
export const GET = guardedRoute("cartons.print", {}, async ({ params }) => {
  const identity = segmentValue(params.identity);
  if (!identity) throw new AppError(404, "No shipment with that serial.");
  const pdf = await deliveryNotePdf(getDb(), identity, { baseUrl: await appBaseUrl() });
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="delivery-note-${identity.replace(/[^A-Za-z0-9*-]/g, "")}.pdf"`,
      "cache-control": "private, no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
