"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { saveFinish, setReferenceActive } from "@/lib/workshop/finishes-dealers";
import { finishSchema } from "@/lib/workshop/reference-schemas";

const retireSchema = z.object({
  finishId: z.string({ error: "Choose a finish." }).trim().min(1, "Choose a finish."),
  active: z.enum(["true", "false"], { error: "Say whether to retire or restore it." }).transform((v) => v === "true"),
  reason: z.string({ error: "Say why." }).trim().min(3, "Say why, in a few words: it is kept in the finish's history.").max(500, "Keep the reason under 500 characters."),
});

export const saveFinishAction = guardedAction("admin.reference", finishSchema, async (input, user) => {
  const saved = await saveFinish(getDb(), input, { id: user.id });
  return { ok: true, message: saved.created ? `${saved.code} added.` : `${saved.code} saved.`, revalidate: [paths.adminFinishes], redirectTo: `${paths.adminFinishes}?saved=${encodeURIComponent(saved.code)}` };
});

export const retireFinishAction = guardedAction("admin.reference", retireSchema, async (input, user) => {
  const { name } = await setReferenceActive(getDb(), { kind: "finish", id: input.finishId, active: input.active, reason: input.reason }, { id: user.id });
  return { ok: true, message: input.active ? `${name} is back in use.` : `${name} is retired: new flitches and lacquer batches no longer offer it.`, revalidate: [paths.adminFinishes] };
});
