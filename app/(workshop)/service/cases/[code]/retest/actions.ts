"use server";
import { getDb } from "@/db";
import { bandLabel, formatDb, formatLimitDb } from "@/lib/acoustics";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { retestCase } from "@/lib/service/retest";
import { retestSchema } from "./schemas";

export const retestAction = guardedAction("service.work", retestSchema, async (input, user) => {
  const r = await retestCase(getDb(), { code: input.code, left: { name: input.leftName, text: input.leftText }, right: { name: input.rightName, text: input.rightText } }, { id: user.id });
  const figures = `${formatDb(r.comparison.maxAbsDiffDb)} at ${bandLabel(r.comparison.worstBand)}`;
  const message = r.revision
    ? `Passed: the largest difference is ${figures}, within the ${formatLimitDb(r.limitDb)} limit. Revision ${r.revision.revision} of the certificate is issued.`
    : `Failed: ${figures}, over the ${formatLimitDb(r.limitDb)} limit. The case stays repaired.`;
  return { ok: true, message, revalidate: [paths.serviceRetest(input.code), paths.serviceCase(input.code), "/service"], redirectTo: paths.serviceRetest(input.code) };
});
