import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { certificateData, openablePrint, pairByIdentity, PRINT_OPEN_FOR_MS, renderCertificate } from "@/lib/certificates";
import { segmentValue } from "@/lib/paths";

const GONE = `This print is not open to you: a print can be opened again only by the person who made it, for ${PRINT_OPEN_FOR_MS / 60_000} minutes. Print the certificate again (after the original, a print is a copy).`;

/**
 * The PDF of one recorded print of a certificate (the original, or a copy marked COPY), for the
 * person who printed it, for a few minutes. Reading it records nothing: printing is the POST.
 */
export const GET = guardedRoute("certificates.print", {}, async ({ params, user }) => {
  const db = getDb();
  const identity = segmentValue(params.identity);
  const printId = segmentValue(params.printId);
  const pair = identity ? await pairByIdentity(db, identity) : null;
  if (!pair) throw new AppError(404, "No pair with that serial.");
  const print = printId ? await openablePrint(db, { printId, pairId: pair.id, actorId: user.id }) : null;
  if (!print) throw new AppError(404, GONE);
  const data = await certificateData(db, pair.id, { baseUrl: await appBaseUrl(), copy: !print.original, revisionId: print.revisionId });
  const revision = data.revision;
  const pdf = await renderCertificate(data);
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="certificate-${pair.identity}${revision ? `-revision-${revision.number}` : ""}${print.original ? "" : "-copy"}.pdf"`,
      "cache-control": "private, no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
