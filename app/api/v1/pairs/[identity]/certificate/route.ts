import { z } from "zod";
import { getDb } from "@/db";
import { homeStation } from "@/lib/areas";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { certificateData, certificatePrinted, issueCertificate, pairByIdentity, recordCertificatePrint, renderCertificate } from "@/lib/certificates";

const query = z.object({
  /** `copy=1` asks for a copy even of a certificate never printed (a spare for the service desk). */
  copy: z.enum(["0", "1"], { error: "copy is 0 or 1." }).optional(),
});

/**
 * The pair's certificate as a PDF. Issues it on the first print (refused, 409, before a passing
 * final test); the first print is the original and every later one a copy, marked COPY on the
 * page and `copy: true` in its "certificate.printed" event. Packers and the service desk print
 * it, so it takes "labels.print", which every workshop role holds.
 */
export const GET = guardedRoute("labels.print", { query }, async ({ params, query, user }) => {
  const db = getDb();
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const pair = await pairByIdentity(db, identity);
  if (!pair) throw new AppError(404, "No pair with that serial.");
  const certificate = await issueCertificate(db, pair.id, user.id);
  const copy = query.copy === "1" || (await certificatePrinted(db, certificate));
  // Rendered before the print is recorded, so a failure records nothing.
  const pdf = await renderCertificate(await certificateData(db, pair.id, { baseUrl: await appBaseUrl(), copy }));
  await recordCertificatePrint(db, certificate.id, { actorId: user.id, copy, station: homeStation(user.roles) });
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="certificate-${pair.identity}.pdf"`,
      "cache-control": "private, no-store",
      "x-content-type-options": "nosniff",
    },
  });
});
