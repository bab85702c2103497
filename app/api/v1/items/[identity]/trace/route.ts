import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { momentParam, resolveMoment } from "@/lib/genealogy/moment";
import { dealersOf, itemDetails } from "@/lib/genealogy/queries";
import { toTree, traceBackward, traceForward } from "@/lib/genealogy/trace";

const query = z.object({
  direction: z.enum(["backward", "forward"], { error: "direction is backward or forward." }).default("backward"),
  asOf: momentParam,
  shape: z.enum(["list", "tree"]).default("list"),
});

/** Backward (everything inside) or forward (everything holding it) trace, now, as built, ever or as of a date. */
export const GET = guardedRoute("register.read", { query }, async ({ params, query }) => {
  const db = getDb();
  const identity = String(params.identity ?? "") // decoded once by Next, checked by guardedRoute;
  const found = await itemDetails(db, identity);
  if (!found) throw new AppError(404, "No item with that serial.");
  const { moment, label, note } = resolveMoment(query.asOf, found.shippedAt);
  const head = { identity, direction: query.direction, moment: label, ...(note ? { note } : {}) };
  if (query.direction === "forward") {
    const nodes = await traceForward(db, found.item.id, moment);
    const dealers = await dealersOf(db, nodes.filter((n) => n.kind === "shipment").map((n) => n.id));
    return { ...head, nodes, dealers };
  }
  const nodes = await traceBackward(db, found.item.id, moment);
  return { ...head, ...(query.shape === "tree" ? { tree: toTree(nodes) } : { nodes }) };
});
