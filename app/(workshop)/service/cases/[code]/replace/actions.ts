"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { fitReplacement, markRepaired } from "@/lib/service/repair";
import { releaseReservation, reserveReplacement, reserveReplacementSet } from "@/lib/service/replacements";
import { formatDb } from "@/lib/acoustics/format";
import { fitSchema, releaseSchema, repairedSchema, reserveSchema, reserveSetSchema } from "./schemas";

const pages = (code: string) => [paths.serviceCase(code), `${paths.serviceCase(code)}/replace`, "/service"];

export const reserveAction = guardedAction("service.work", reserveSchema, async (input, user) => {
  const r = await reserveReplacement(getDb(), input, { id: user.id });
  return { ok: true, message: `${r.serial} is reserved for this case (largest difference from the survivor ${formatDb(r.maxDiffDb)}).`, revalidate: pages(input.code) };
});

export const reserveSetAction = guardedAction("service.work", reserveSetSchema, async (input, user) => {
  const r = await reserveReplacementSet(getDb(), input, { id: user.id });
  return { ok: true, message: `${r.left} (left) and ${r.right} (right) are reserved for this case (they differ by at most ${formatDb(r.maxDiffDb)}).`, revalidate: pages(input.code) };
});

export const releaseAction = guardedAction("service.work", releaseSchema, async (input, user) => {
  const r = await releaseReservation(getDb(), { code: input.code, serial: input.serial, reason: "released at the desk" }, { id: user.id });
  return { ok: true, message: `${r.serial} is released and back in stock.`, revalidate: pages(input.code) };
});

export const fitAction = guardedAction("service.work", fitSchema, async (input, user) => {
  const r = await fitReplacement(getDb(), input, { id: user.id });
  return { ok: true, message: `${r.fitted} is fitted in place of ${r.removed}.`, revalidate: pages(input.code) };
});

export const markRepairedAction = guardedAction("service.work", repairedSchema, async (input, user) => {
  await markRepaired(getDb(), { code: input.code }, { id: user.id });
  return { ok: true, revalidate: pages(input.code), redirectTo: paths.serviceCase(input.code) };
});
