import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { search } from "@/lib/search/search";

const query = z.object({
  q: z.string().max(200, "Search for at most 200 characters.").default(""),
  limit: z.coerce.number().int().min(1).max(50).default(10),
});

/** The search box: exact serial, "did you mean" for a mistyped check character, then fuzzy matches. */
export const GET = guardedRoute("register.read", { query }, async ({ query }) => search(getDb(), query.q, query.limit));
