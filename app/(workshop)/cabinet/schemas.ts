import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";

export const scanSchema = z.object({
  code: z.string().trim().min(3, "Scan or type a cabinet, pair or trim-part serial.").max(80),
  station: z.string().trim().max(30).default(""),
});

export const stepSchema = z.object({
  pair: z.string().min(1),
  pairId: z.string().min(1),
  seq: wholeNumber(z.number({ error: "Choose the step." }).int().min(1, "Choose the step.").max(999)),
  sides: z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(z.enum(["L", "R"]))).refine((s) => s.length > 0, "Tick what the step was done on."),
  /** Minutes ago the step started (e.g. when the clamp went on); 0 = now. */
  startedMinutesAgo: wholeNumber(z.number({ error: "Give minutes as a whole number, such as 15." }).int("Whole minutes.").min(0, "Not in the future.").max(24 * 60, "At most 24 hours ago; record steps the day they are done."), { empty: 0 }),
  /** Sent only by the button that answers "record it and open a nonconformance?": names the readings confirmed. */
  confirmOutOfWindow: z.string().max(2000).optional(),
});

export const repartnerSchema = z.object({
  pair: z.string().min(1),
  pairId: z.string().min(1),
  cabinet: z.string().trim().min(3, "Scan or type the new cabinet's serial.").max(60),
  reason: z.string().trim().min(5, "Give the reason for the new partner.").max(500),
});

export const correctionSchema = z.object({
  pair: z.string().min(1),
  pairId: z.string().min(1),
  recordId: wholeNumber(z.number({ error: "Choose the recorded step to correct." }).int().min(1, "Choose the recorded step to correct.")),
  /** When the step really started, as minutes before it was recorded; empty keeps the start. */
  startedMinutesBefore: wholeNumber(z.number({ error: "Give minutes as a whole number, such as 20." }).int("Whole minutes.").min(0, "A step starts before it is recorded, not after.").max(24 * 60, "At most 24 hours before it was recorded.").nullable(), { empty: null }),
  /** Checked (at least a few words) by lib/route/corrections.ts, which says why beside the field. */
  reason: z.string().max(2000).default(""),
  /** Sent only by the button that answers "record it and open a nonconformance?". */
  confirmOutOfWindow: z.string().max(2000).optional(),
});
