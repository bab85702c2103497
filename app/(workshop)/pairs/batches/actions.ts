"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { createLacquerBatch } from "@/lib/veneer/flitches";
import { lacquerBatchSchema } from "../../flitches/schemas";

export const lacquerBatchAction = guardedAction("cabinet.batch", lacquerBatchSchema, async (input, user) => {
  const station = user.roles.includes("cabinet") ? "cabinet" : "veneer";
  const made = await createLacquerBatch(getDb(), input, { id: user.id }, station);
  return {
    ok: true,
    revalidate: ["/pairs/batches"],
    redirectTo: `/pairs/batches?made=${encodeURIComponent(made.map((c) => c.identity).join(","))}`,
  };
});
