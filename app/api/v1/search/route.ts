import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { search } from "@/lib/search/search";

const query = z.object({
  q: z.string().max(200, "Search for at most 200 characters.").default(""),
  limit: wholeNumber(z.number({ error: "limit is a whole number from 1 to 50." }).int().min(1, "limit is at least 1.").max(50, "limit is at most 50."), { empty: 10 }),
});

/**
 * The search box: exact serial, "did you mean" for a mistyped check character, then everything whose
 * text holds what was typed. The user's permissions keep out hits whose page they may not open.
 */
export const GET = guardedRoute("register.read", { query }, async ({ query, user }) => search(getDb(), query.q, query.limit, { permissions: user.permissions }));
