"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { correctOwner, mergeOwners } from "@/lib/workshop/owners";
import { ownerCorrectionSchema, ownerMergeSchema } from "@/lib/workshop/reference-schemas";

/** Corrects an owner's record; the event keeps what it said before, and why it changed. */
export const correctOwnerAction = guardedAction("admin.reference", ownerCorrectionSchema, async (input, user) => {
  const { name } = await correctOwner(getDb(), input, { id: user.id });
  return { ok: true, message: `${name}'s record corrected.`, revalidate: [paths.adminOwners] };
});

/** Merges a duplicate owner record into the one kept. */
export const mergeOwnersAction = guardedAction("admin.reference", ownerMergeSchema, async (input, user) => {
  const r = await mergeOwners(getDb(), input, { id: user.id });
  return { ok: true, message: `${r.merged}'s record merged into ${r.kept}'s${r.pairs ? `, with ${r.pairs === 1 ? "1 pair" : `${r.pairs} pairs`}` : ""}.`, revalidate: [paths.adminOwners] };
});
