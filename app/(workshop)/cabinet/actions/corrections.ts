"use server";
import type { z } from "zod";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { formDataValues } from "@/lib/route/form";
import { correctRecord, type Corrector } from "@/lib/route/corrections";
import { OutOfWindowUnconfirmed } from "@/lib/route/pair-route";
import { paths } from "@/lib/paths";
import { correctionSchema } from "../schemas";

type CorrectionInput = z.infer<typeof correctionSchema>;

/** One body for both doors: the answer to an out-of-window question, and the page that says what changed. */
async function correct(input: CorrectionInput, corrector: Corrector) {
  const readings = formDataValues(input as Record<string, unknown>, "reading.");
  try {
    const r = await correctRecord(getDb(), { pairId: input.pairId, recordId: input.recordId, readings, startedMinutesBefore: input.startedMinutesBefore, reason: input.reason, confirmOutOfWindow: input.confirmOutOfWindow ?? null }, corrector);
    const q = new URLSearchParams({ corrected: String(r.correctionId) });
    return { ok: true as const, revalidate: [paths.cabinetPair(input.pair), paths.quality], redirectTo: `${paths.cabinetPair(input.pair)}?${q}` };
  } catch (e) {
    if (!(e instanceof OutOfWindowUnconfirmed)) throw e;
    const kept = Object.fromEntries(Object.entries(input).filter(([k, v]) => (k.startsWith("reading.") || k === "reason" || k === "recordId" || k === "startedMinutesBefore") && (typeof v === "string" || typeof v === "number")).map(([k, v]) => [k, String(v)]));
    return { ok: false as const, status: e.status, message: e.message, fieldErrors: e.fieldErrors, values: kept, data: { confirmOutOfWindow: e.confirmation } };
  }
}

/** The cabinet shop corrects a reading it recorded itself (lib/route/corrections.ts checks it is theirs). */
export const correctOwnReadingAction = guardedAction("cabinet.work", correctionSchema.passthrough(), (input, user) => correct(input, { id: user.id, mayCorrectAny: false, mayCorrectOwn: true }));

/** Quality corrects any recorded reading. */
export const correctReadingAction = guardedAction("quality.work", correctionSchema.passthrough(), (input, user) => correct(input, { id: user.id, mayCorrectAny: true, mayCorrectOwn: true }));
