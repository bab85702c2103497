"use server";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedAction } from "@/lib/auth/guard";
import { formDataValues } from "@/lib/route/form";
import { pairOf, recordStep } from "@/lib/route/pair-route";
import { repartner } from "@/lib/route/nonconformances";
import { now } from "@/lib/clock";
import { paths } from "@/lib/paths";
import { repartnerSchema, scanSchema, stepSchema } from "../schemas";

const pairPage = paths.cabinetPair;

export const scanAction = guardedAction("cabinet.work", scanSchema, async (input) => {
  const pair = await pairOf(getDb(), input.code);
  if (!pair) throw new AppError(404, `${input.code} is not a cabinet or pair on the route.`, { code: ["Check the label and scan again."] });
  return { ok: true, redirectTo: pairPage(pair.identity, input.station || undefined) };
});

/** The step form sends its readings as `reading.<key>` fields; the rest as the schema says. */
export const recordStepAction = guardedAction("cabinet.work", stepSchema.passthrough(), async (input, user) => {
  const readings = formDataValues(input as Record<string, unknown>, "reading.");
  const startedAt = new Date(now().getTime() - input.startedMinutesAgo * 60_000);
  const result = await recordStep(getDb(), { pairId: input.pairId, seq: input.seq, sides: input.sides, startedAt, readings }, { id: user.id });
  return {
    ok: true,
    message: result.nc ? `Recorded. A reading is out of its window: nonconformance ${result.nc} holds the pair until quality dispositions it.` : "Recorded.",
    revalidate: [pairPage(input.pair), paths.cabinet],
  };
});

export const repartnerAction = guardedAction("quality.work", repartnerSchema, async (input, user) => {
  const cabinet = await repartner(getDb(), { pairId: input.pairId, cabinet: input.cabinet, reason: input.reason }, { id: user.id });
  return { ok: true, message: `${cabinet.identity} is the pair's new partner; it starts the route from the first step.`, revalidate: [pairPage(input.pair), paths.cabinet] };
});
