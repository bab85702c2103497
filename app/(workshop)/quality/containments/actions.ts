"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { affectedOf, raiseContainment, resolveTarget } from "@/lib/containments";
import { paths } from "@/lib/paths";
import { AFFECTED_GROUPS } from "@/lib/vocabulary/containments";
import { raiseFormSchema } from "./schemas";

const targetOf = (input: { by: "item" | "window"; target: string; station: string; from: string; to: string }) =>
  input.by === "window" ? { station: input.station, from: input.from, to: input.to } : input.target;

/**
 * How many serials the target reaches today, per group, before anything is written: the preview
 * reads only (resolveTarget and affectedOf write nothing).
 */
export const previewContainmentAction = guardedAction("quality.work", raiseFormSchema, async (input) => {
  const db = getDb();
  const target = await resolveTarget(db, targetOf(input));
  const rows = await affectedOf(db, target);
  const counts = Object.fromEntries(AFFECTED_GROUPS.map((g) => [g, String(rows.filter((r) => r.group === g).length)]));
  return { ok: true, data: { target: target.label, total: String(rows.length), ...counts } };
});

/** Raises the containment and opens its page. */
export const raiseContainmentAction = guardedAction("quality.work", raiseFormSchema, async (input, user) => {
  const raised = await raiseContainment(getDb(), { target: targetOf(input), reason: input.reason, severity: input.severity }, user);
  return { ok: true, revalidate: [paths.quality, paths.containments], redirectTo: paths.containment(raised.code) };
});
