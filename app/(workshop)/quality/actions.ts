"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { dispositionNc } from "@/lib/route/nonconformances";
import { dispositionSchema, withQuery } from "./schemas";

/** Records quality's decision, then returns to the page the form was on, which says what was recorded. */
export const dispositionAction = guardedAction("quality.work", dispositionSchema, async (input, user) => {
  const { code } = await dispositionNc(getDb(), { ncId: input.ncId, disposition: input.disposition, reworkToSeq: input.reworkToSeq, scrapSide: input.scrapSide, reason: input.reason }, { id: user.id });
  const back = input.back || paths.quality;
  return { ok: true, revalidate: [paths.quality, paths.cabinet, back.split(/[?#]/)[0]!], redirectTo: withQuery(back, "dispositioned", code) ?? paths.quality };
});
