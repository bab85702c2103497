"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { bandLabel, formatDb, formatLimitDb } from "@/lib/acoustics";
import { recordFinalTest } from "@/lib/lab/final-test";

const schema = z.object({
  pair: z.string().trim().min(3, "Scan or type the pair's serial.").max(60),
  leftName: z.string().max(200).default("left.txt"),
  leftText: z.string().min(1, "Choose the left speaker's response file.").max(2_000_000),
  rightName: z.string().max(200).default("right.txt"),
  rightText: z.string().min(1, "Choose the right speaker's response file.").max(2_000_000),
});

export const finalTestAction = guardedAction("lab.work", schema, async (input, user) => {
  const r = await recordFinalTest(getDb(), { pair: input.pair, left: { name: input.leftName, text: input.leftText }, right: { name: input.rightName, text: input.rightText } }, { id: user.id });
  const verdict = r.comparison.pass
    ? `Passed: the largest difference is ${formatDb(r.comparison.maxAbsDiffDb)} at ${bandLabel(r.comparison.worstBand)}, within the ${formatLimitDb(r.limitDb)} limit. The pair is ready to pack.`
    : `Failed: ${formatDb(r.comparison.maxAbsDiffDb)} at ${bandLabel(r.comparison.worstBand)}, over the ${formatLimitDb(r.limitDb)} limit. Nonconformance ${r.nc} is open for quality.`;
  return { ok: true, message: verdict, revalidate: ["/lab/final-test", "/lab"], redirectTo: `/lab/final-test?pair=${encodeURIComponent(input.pair.trim().toUpperCase())}&result=${r.comparison.pass ? "pass" : "fail"}` };
});
