"use server";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedAction } from "@/lib/auth/guard";
import { acceptPlan, batchByCode, failUnit, importTsCsv, recordMeasurement, registerBatch } from "@/lib/lab/units";
import { acceptSchema, batchSchema, failSchema, measurementSchema, tsCsvSchema } from "../schemas";

const batchPage = (code: string) => `/lab/batches/${encodeURIComponent(code)}`;

export const registerBatchAction = guardedAction("lab.work", batchSchema, async (input, user) => {
  const batch = await registerBatch(getDb(), input, { id: user.id });
  return { ok: true, revalidate: ["/lab"], redirectTo: `${batchPage(batch.code)}?registered=1` };
});

export const measurementAction = guardedAction("lab.work", measurementSchema, async (input, user) => {
  const { batch, itemId, responseName, responseText, ...ts } = input;
  await recordMeasurement(getDb(), { itemId, response: responseText.trim() ? { name: responseName || "response.txt", text: responseText } : null, ts }, { id: user.id });
  return { ok: true, message: "Measurement saved.", revalidate: [batchPage(batch), "/lab"] };
});

export const failUnitAction = guardedAction("lab.work", failSchema, async (input, user) => {
  await failUnit(getDb(), { itemId: input.itemId, reason: input.reason }, { id: user.id });
  return { ok: true, message: "Unit set aside as failed.", revalidate: [batchPage(input.batch), "/lab"] };
});

export const tsCsvAction = guardedAction("lab.work", tsCsvSchema, async (input, user) => {
  const db = getDb();
  const batch = await batchByCode(db, input.batch);
  if (!batch) throw new AppError(404, "That batch is not in the register.");
  const n = await importTsCsv(db, input.csv, { batchId: batch.id }, { id: user.id });
  return { ok: true, message: `Thiele–Small parameters saved for ${n} unit${n === 1 ? "" : "s"}.`, revalidate: [batchPage(input.batch), "/lab"] };
});

export const acceptPlanAction = guardedAction("lab.work", acceptSchema, async (input, user) => {
  const sets = await acceptPlan(getDb(), { batchId: input.batchId, modelId: input.modelId, pairs: input.pairs, fsWeight: input.fsWeight, qtsWeight: input.qtsWeight }, { id: user.id });
  return { ok: true, revalidate: ["/lab", batchPage(input.batch)], redirectTo: `/lab/match?batch=${encodeURIComponent(input.batch)}&accepted=${encodeURIComponent(sets.map((s) => s.code).join(","))}` };
});
