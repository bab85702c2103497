"use server";
import { paths } from "@/lib/paths";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { confirmRuns } from "@/lib/veneer/flitches";
import { confirmSchema } from "../schemas";

export const confirmRunsAction = guardedAction("veneer.work", confirmSchema, async (input, user) => {
  const made = await confirmRuns(getDb(), { flitchId: input.flitchId, modelId: input.modelId, reservePerPair: input.reservePerPair, runs: input.runs }, { id: user.id });
  const pairs = made.map((m) => m.pair.identity).join(",");
  return {
    ok: true,
    revalidate: [paths.veneer, paths.flitch(input.flitch), paths.register],
    redirectTo: paths.flitchConfirmed(input.flitch, pairs),
  };
});
