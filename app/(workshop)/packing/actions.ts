"use server";
import { paths } from "@/lib/paths";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { moveCarton, packPair, shipCartons } from "@/lib/dispatch";
import { moveSchema, packSchema, shipSchema } from "./schemas";

const HOME = paths.packing;
const packPage = paths.pack;

export const packPairAction = guardedAction("packing.work", packSchema, async (input, user) => {
  const r = await packPair(getDb(), { pairIdentity: input.pair, left: input.left, right: input.right, scans: input.scan, checked: input.checked, location: input.location }, { id: user.id });
  return {
    ok: true,
    message: `${r.pair.identity} is packed in carton ${r.carton.identity} (SSCC ${r.sscc}), stored at ${r.location}.`,
    revalidate: [HOME, packPage(r.pair.identity)],
    redirectTo: `${packPage(r.pair.identity)}?packed=1`,
  };
});

export const moveCartonAction = guardedAction("packing.work", moveSchema, async (input, user) => {
  const r = await moveCarton(getDb(), { carton: input.carton, location: input.location }, { id: user.id });
  return { ok: true, message: `${r.carton.identity} is now at ${r.location}.`, revalidate: [HOME] };
});

export const shipCartonsAction = guardedAction("packing.work", shipSchema, async (input, user) => {
  const r = await shipCartons(getDb(), input, { id: user.id });
  const n = r.pairs.length;
  return {
    ok: true,
    message: `Shipment ${r.shipment.identity}: ${n} carton${n === 1 ? "" : "s"} shipped. The dealer's e-mail, with ${n === 1 ? "the certificate" : `${n} certificates`}, is on its way.`,
    data: { shipment: r.shipment.identity },
    revalidate: [HOME],
  };
});
