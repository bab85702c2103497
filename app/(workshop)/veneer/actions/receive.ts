"use server";
import { paths } from "@/lib/paths";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { receiveFlitch } from "@/lib/veneer/flitches";
import { receiveSchema } from "../schemas";

export const receiveFlitchAction = guardedAction("veneer.work", receiveSchema, async (input, user) => {
  const flitch = await receiveFlitch(getDb(), input, { id: user.id });
  return { ok: true, revalidate: [paths.veneer], redirectTo: `${paths.flitch(flitch.identity)}?received=1` };
});
