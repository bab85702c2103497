"use server";
import { z } from "zod";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { saveDealer, setReferenceActive } from "@/lib/workshop/finishes-dealers";
import { dealerSchema } from "@/lib/workshop/reference-schemas";

const retireSchema = z.object({
  dealerId: z.string({ error: "Choose a dealer." }).trim().min(1, "Choose a dealer."),
  active: z.enum(["true", "false"], { error: "Say whether to mark it inactive or active." }).transform((v) => v === "true"),
  reason: z.string({ error: "Say why." }).trim().min(3, "Say why, in a few words: it is kept in the dealer's history.").max(500, "Keep the reason under 500 characters."),
});

export const saveDealerAction = guardedAction("admin.reference", dealerSchema, async (input, user) => {
  const saved = await saveDealer(getDb(), input, { id: user.id });
  return { ok: true, message: saved.created ? `${saved.code} added.` : `${saved.code} saved.`, revalidate: [paths.adminDealers], redirectTo: `${paths.adminDealers}?saved=${encodeURIComponent(saved.code)}` };
});

export const retireDealerAction = guardedAction("admin.reference", retireSchema, async (input, user) => {
  const { name } = await setReferenceActive(getDb(), { kind: "dealer", id: input.dealerId, active: input.active, reason: input.reason }, { id: user.id });
  return { ok: true, message: input.active ? `${name} is active again.` : `${name} is marked inactive: shipping no longer offers it.`, revalidate: [paths.adminDealers] };
});
