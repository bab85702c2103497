"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { dispositionNc } from "@/lib/route/nonconformances";
import { dispositionSchema } from "./schemas";

export const dispositionAction = guardedAction("quality.work", dispositionSchema, async (input, user) => {
  await dispositionNc(getDb(), { ncId: input.ncId, disposition: input.disposition, reworkToSeq: input.reworkToSeq, scrapSide: input.scrapSide, reason: input.reason }, { id: user.id });
  return { ok: true, message: "Dispositioned.", revalidate: [paths.quality, paths.cabinet], ...(input.back ? { redirectTo: input.back } : {}) };
});
