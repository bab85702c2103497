"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { itemHref } from "@/lib/paths";
import { releaseReserve, returnReserve } from "@/lib/veneer/flitches";
import { releaseSchema, reserveSchema } from "../schemas";

export const releaseReserveAction = guardedAction("veneer.work", releaseSchema, async (input, user) => {
  await releaseReserve(getDb(), { leafId: input.leafId, cabinetId: input.cabinetId, position: input.position, reason: input.reason }, { id: user.id });
  return { ok: true, message: `Face ${input.position} re-veneered from the reserve. The replaced leaf is recorded as scrapped.`, revalidate: [itemHref(input.pair)] };
});

export const returnReserveAction = guardedAction("veneer.work", reserveSchema, async (input, user) => {
  await returnReserve(getDb(), { leafId: input.leafId, reason: input.reason }, { id: user.id });
  return { ok: true, message: "Reserve leaf returned to the flitch's free leaves.", revalidate: [itemHref(input.pair)] };
});
