"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { changeCaseState, recordFinding } from "@/lib/service/desk";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { findingFormSchema, moveFormSchema } from "./schemas";

export const moveCaseAction = guardedAction("service.work", moveFormSchema, async (input, user) => {
  const moved = await changeCaseState(getDb(), { code: input.code, from: input.from, to: input.to, reason: input.reason }, user);
  return { ok: true, message: `Case ${moved.code} is now “${CASE_STATE_WORDS[moved.state]}”.`, revalidate: [paths.service, paths.serviceCase(moved.code)] };
});

export const recordFindingAction = guardedAction("service.work", findingFormSchema, async (input, user) => {
  await recordFinding(getDb(), input, user);
  return { ok: true, message: "The finding is recorded.", revalidate: [paths.serviceCase(input.code)] };
});
