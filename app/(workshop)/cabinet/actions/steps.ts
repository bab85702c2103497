"use server";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedAction } from "@/lib/auth/guard";
import { formDataValues } from "@/lib/route/form";
import { OutOfWindowUnconfirmed, recordStep, routedItemOf } from "@/lib/route/pair-route";
import { repartner } from "@/lib/route/nonconformances";
import { now } from "@/lib/clock";
import { paths } from "@/lib/paths";
import { repartnerSchema, scanSchema, stepSchema } from "../schemas";

const pairPage = paths.cabinetPair;

export const scanAction = guardedAction("cabinet.work", scanSchema, async (input) => {
  const pair = await routedItemOf(getDb(), input.code);
  if (!pair) throw new AppError(404, `${input.code} is not a cabinet, pair or trim part on a route.`, { code: ["Check the label and scan again."] });
  return { ok: true, redirectTo: pairPage(pair.identity, input.station || undefined) };
});

/** The fields the step form shows, sent back so the person sees what they typed while they are asked. */
function keptFields(input: Record<string, unknown>, sides: string[]): Record<string, string | string[]> {
  const fields = Object.entries(input).filter(([k, v]) => (k.startsWith("reading.") || k === "startedMinutesAgo") && (typeof v === "string" || typeof v === "number"));
  return { ...Object.fromEntries(fields.map(([k, v]) => [k, String(v)])), sides };
}

/**
 * The step form sends its readings as `reading.<key>` fields; the rest as the schema says. Readings
 * out of their window are recorded only when the answer to the question names them; until then
 * the form asks (nothing is written). On success, the pair's page says what was recorded.
 */
export const recordStepAction = guardedAction("cabinet.work", stepSchema.passthrough(), async (input, user) => {
  const readings = formDataValues(input as Record<string, unknown>, "reading.");
  const startedAt = new Date(now().getTime() - input.startedMinutesAgo * 60_000);
  let result: Awaited<ReturnType<typeof recordStep>>;
  try {
    result = await recordStep(getDb(), { pairId: input.pairId, seq: input.seq, sides: input.sides, startedAt, readings, confirmOutOfWindow: input.confirmOutOfWindow ?? null }, { id: user.id });
  } catch (e) {
    if (!(e instanceof OutOfWindowUnconfirmed)) throw e;
    return { ok: false, status: e.status, message: e.message, fieldErrors: e.fieldErrors, values: keptFields(input as Record<string, unknown>, input.sides), data: { confirmOutOfWindow: e.confirmation } };
  }
  return {
    ok: true,
    revalidate: [pairPage(input.pair), paths.cabinet],
    redirectTo: `${pairPage(input.pair)}?recorded=${result.recordId}`,
  };
});

export const repartnerAction = guardedAction("quality.work", repartnerSchema, async (input, user) => {
  const cabinet = await repartner(getDb(), { pairId: input.pairId, cabinet: input.cabinet, reason: input.reason }, { id: user.id });
  return { ok: true, message: `${cabinet.identity} is the pair's new partner; it starts the route from the first step.`, revalidate: [pairPage(input.pair), paths.cabinet] };
});
