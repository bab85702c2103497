import { z } from "zod";
import { getDb } from "@/db";
import { homeStation } from "@/lib/areas";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { certificateData, currentRevision, issueCertificate, pairByIdentity, recordCertificatePrint, recordRevisionPrint } from "@/lib/certificates";
import { printPaths, segmentValue } from "@/lib/paths";

const query = z.object({
  /** `copy=1` asks for a copy even of a certificate never printed (a spare for the service desk). */
  copy: z.enum(["0", "1"], { error: "copy is 0 or 1." }).optional(),
});

/**
 * Prints the pair's certificate: issues it on the first print (refused, 409, before a passing
 * final test), records the print (the first is the original, every later one a copy, marked COPY)
 * and sends the browser on (303) to the recorded print's PDF. After a repair it prints the current
 * revision (one original per revision, later prints copies); older revisions stay on record. A POST, from a button: opening a
 * link or reloading a page never prints. Packers and the service desk print it
 * ("certificates.print"; PRODUCT.md gives it to nobody else).
 */
export const POST = guardedRoute("certificates.print", { query }, async ({ params, query, user }) => {
  const db = getDb();
  const identity = segmentValue(params.identity);
  const pair = identity ? await pairByIdentity(db, identity) : null;
  if (!pair) throw new AppError(404, "No pair with that serial.");
  const certificate = await issueCertificate(db, pair.id, user.id);
  const revision = await currentRevision(db, certificate.id);
  // Everything the certificate prints is gathered first: a pair it cannot be printed for records no print.
  await certificateData(db, pair.id, { baseUrl: await appBaseUrl(), copy: true, revisionId: revision?.id ?? null });
  const opts = { actorId: user.id, copy: query.copy === "1", station: homeStation(user.roles) };
  const print = revision ? await recordRevisionPrint(db, revision.id, opts) : await recordCertificatePrint(db, certificate.id, opts);
  const href = printPaths.certificatePrint(pair.identity, print.id);
  return Response.json(
    { print: { original: print.original, copy: !print.original, revision: revision?.revision ?? 1 }, href },
    { status: 303, headers: { location: href, "cache-control": "no-store" } },
  );
});
