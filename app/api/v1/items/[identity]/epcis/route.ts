import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { epcisDocumentForItem } from "@/lib/genealogy/epcis";
import { itemByIdentity } from "@/lib/genealogy/graph";

/** A serial's whole history (it and everything ever inside it) as a GS1 EPCIS 2.0 JSON-LD download. */
export const GET = guardedRoute("register.read", {}, async ({ params }) => {
  const db = getDb();
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const item = await itemByIdentity(db, identity);
  if (!item) throw new AppError(404, "No item with that serial.");
  const doc = await epcisDocumentForItem(db, item.id, { baseUri: await appBaseUrl() });
  // Header values are ASCII and the name is quoted: replace what would break either.
  const filename = `${item.identity.replace(/[^\x20-\x7e]|["\\]/g, "_")}-epcis.json`;
  return new Response(JSON.stringify(doc, null, 2), {
    headers: {
      "content-type": "application/ld+json",
      "content-disposition": `attachment; filename="${filename}"`,
    },
  });
});
