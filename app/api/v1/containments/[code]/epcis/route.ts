import { z } from "zod";
import { getDb } from "@/db";
import { appBaseUrl, guardedRoute } from "@/lib/auth/guard";
import { affectedEpcis } from "@/lib/containments";

const query = z.object({ dealer: z.string().max(40, "dealer is a dealer's code.").optional() });

/** The events of a containment's affected serials (with ?dealer=CODE, that dealer's) as a GS1 EPCIS 2.0 JSON-LD download. */
export const GET = guardedRoute("register.read", { query }, async ({ params, query }) => {
  const out = await affectedEpcis(getDb(), String(params.code ?? ""), query.dealer, { baseUri: await appBaseUrl() });
  return new Response(JSON.stringify(out.doc, null, 2), {
    headers: {
      "content-type": "application/ld+json",
      "content-disposition": `attachment; filename="${out.filename}"`,
      "cache-control": "no-store",
    },
  });
});
