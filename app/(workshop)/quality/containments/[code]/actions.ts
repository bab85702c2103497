"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { closeContainment, moveAffected, sendNotices } from "@/lib/containments";
import { paths } from "@/lib/paths";
import { AFFECTED_STATE_WORDS } from "@/lib/vocabulary/containments";
import { closeFormSchema, moveFormSchema, noticesFormSchema } from "./schemas";

const pageOf = (code: string) => [paths.quality, paths.containments, paths.containment(code)];

/**
 * Moves the ticked serials (or every serial of the group that can take the step) on: inspected,
 * cleared or replaced. lib/containments checks every serial first and writes nothing when one cannot move.
 */
export const moveAffectedAction = guardedAction("quality.work", moveFormSchema, async (input, user) => {
  const { moved } = await moveAffected(
    getDb(),
    { code: input.code, ...(input.wholeGroup === "yes" ? { wholeGroup: input.group } : { serials: input.serials }), to: input.to, note: input.note },
    user,
  );
  const cases = [...new Set(moved.flatMap((m) => (m.caseCode ? [m.caseCode] : [])))];
  return {
    ok: true,
    message: `${moved.length} serial${moved.length === 1 ? " is" : "s are"} now “${AFFECTED_STATE_WORDS[input.to]}”.${cases.length ? ` Service case${cases.length === 1 ? "" : "s"} ${cases.join(", ")} opened for the failed shipped serials.` : ""}`,
    revalidate: pageOf(input.code),
  };
});

/** Queues one notice per dealer and per consenting owner not yet told. */
export const sendNoticesAction = guardedAction("quality.work", noticesFormSchema, async (input, user) => {
  const sent = await sendNotices(getDb(), { code: input.code, ownerWords: input.ownerWords }, user);
  const words = [sent.dealers ? `${sent.dealers} dealer${sent.dealers === 1 ? "" : "s"}` : "", sent.owners ? `${sent.owners} owner${sent.owners === 1 ? "" : "s"}` : ""].filter(Boolean).join(" and ");
  return { ok: true, message: `Notices are on their way to ${words || "no one"}.`, revalidate: pageOf(input.code) };
});

/** Closes the containment; the signed-in person is its approver. */
export const closeContainmentAction = guardedAction("quality.work", closeFormSchema, async (input, user) => {
  const c = await closeContainment(getDb(), { code: input.code, reason: input.reason }, user);
  return { ok: true, message: `Containment ${c.code} is closed.`, revalidate: pageOf(c.code) };
});
