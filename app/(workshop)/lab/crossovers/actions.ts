"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { acceptCrossoverPlan, buildCrossover } from "@/lib/lab/crossovers";
import { acceptCrossoversSchema, buildSchema } from "./schemas";

const PAGE = "/lab/crossovers";

export const buildCrossoverAction = guardedAction("lab.work", buildSchema, async (input, user) => {
  const response = input.responseText.trim() ? { name: input.responseName || "response.txt", text: input.responseText } : null;
  const { crossover, verdict } = await buildCrossover(getDb(), { modelId: input.modelId, parts: input.parts, response }, { id: user.id });
  return {
    ok: true,
    message: verdict.pass
      ? `${crossover.identity} built: every part is within its tolerance. It is in stock${response ? " and ready to pair" : "; measure its response to pair it"}.`
      : `${crossover.identity} was recorded as failed: ${verdict.reasons.join("; ")}.`,
    data: { serial: crossover.identity, verdict: verdict.pass ? "pass" : "fail", reasons: verdict.reasons.join("\n") },
    revalidate: [PAGE, "/lab"],
  };
});

export const acceptCrossoverPlanAction = guardedAction("lab.work", acceptCrossoversSchema, async (input, user) => {
  const sets = await acceptCrossoverPlan(getDb(), { modelId: input.modelId, limitDb: input.limitDb, pairs: input.pairs }, { id: user.id });
  return {
    ok: true,
    message: `${sets.length} matched set${sets.length === 1 ? "" : "s"} of boards reserved: ${sets.map((s) => `${s.code} (${s.left} left, ${s.right} right)`).join(", ")}.`,
    revalidate: [PAGE, "/lab"],
  };
});
