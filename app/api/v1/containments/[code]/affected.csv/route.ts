import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { affectedCsv } from "@/lib/containments";

const query = z.object({ dealer: z.string().max(40, "dealer is a dealer's code.").optional() });

/** A containment's affected serials as a CSV download; with ?dealer=CODE only that dealer's. */
export const GET = guardedRoute("register.read", { query }, async ({ params, query }) => {
  const out = await affectedCsv(getDb(), String(params.code ?? ""), query.dealer);
  return new Response(out.csv, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${out.filename}"`,
      "cache-control": "no-store",
    },
  });
});
