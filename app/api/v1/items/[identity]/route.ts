import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { itemDetails } from "@/lib/genealogy/queries";

/** One item: identity, kind, state, model, finish, dealer, where it sits now and when it shipped. */
export const GET = guardedRoute("register.read", {}, async ({ params }) => {
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const found = await itemDetails(getDb(), identity);
  if (!found) throw new AppError(404, "No item with that serial.");
  return found;
});
