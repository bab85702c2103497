import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { replacementView } from "@/lib/service/replacements";

const weight = z.coerce.number({ error: "A weight is a number from 0 to 10." }).min(0, "A weight is at least 0.").max(10, "A weight is at most 10.").optional();

const Query = z.object({
  side: z.string({ error: "Give the side: L (left) or R (right)." }).trim().min(1, "Give the side: L (left) or R (right).").max(10, "The side is L or R."),
  position: z.string({ error: "Give the failed position, such as T for the tweeter or XO for the crossover." }).trim().min(1, "Give the failed position, such as T or XO.").max(10, "A position is a short code such as T, B1 or XO."),
  fs: weight,
  qts: weight,
});

/**
 * The stock ranked against the survivor for a failed position of a case: candidates within the
 * model's limit, best first, and, when none fits, matched pairs from stock to replace both.
 */
export const GET = guardedRoute("register.read", { query: Query }, async ({ params, query }) => {
  const view = await replacementView(getDb(), { code: String(params.code ?? ""), side: query.side, position: query.position, fsWeight: query.fs, qtsWeight: query.qts });
  return {
    survivor: { serial: view.survivor.identity, partType: view.partType ?? "crossover" },
    limitDb: view.limitDb,
    candidates: view.candidates.map((c) => ({ serial: c.id, cost: c.cost, maxDiffDb: c.maxDiffDb })),
    sets: view.sets.map((s) => ({ left: s.a, right: s.b, cost: s.cost, maxDiffDb: s.maxDiffDb })),
    why: view.why,
  };
});
