"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { receiveTrimParts } from "@/lib/trim/receive";
import { receiveTrimSchema } from "./schemas";

export const receiveTrimAction = guardedAction("cabinet.work", receiveTrimSchema, async (input, user) => {
  const received = await receiveTrimParts(getDb(), input, { id: user.id }, "cabinet");
  return {
    ok: true,
    revalidate: [paths.trimParts],
    redirectTo: `${paths.trimParts}?received=${encodeURIComponent(received.parts.map((p) => p.identity).join(","))}&lot=${encodeURIComponent(received.lot.identity)}`,
  };
});
