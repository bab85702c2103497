"use server";
import { getDb } from "@/db";
import { buildSpeakers, checkScan, pairForScan, pairLacquerCabinets } from "@/lib/assembly";
import { guardedAction } from "@/lib/auth/guard";
import { buildSchema, checkScanSchema, openPairSchema, pairLacquerSchema } from "./schemas";

const HOME = "/assembly";
const pairPage = (identity: string) => `${HOME}/${encodeURIComponent(identity)}`;

/** The scan box of the assembly home: a pair, cabinet or speaker label opens its pair. */
export const openPairAction = guardedAction("assembly.work", openPairSchema, async (input) => {
  const pair = await pairForScan(getDb(), input.code);
  return { ok: true, redirectTo: pairPage(pair.identity) };
});

/** Checks one scan as it is entered; writes nothing. A refusal comes back as the message. */
export const checkScanAction = guardedAction("assembly.work", checkScanSchema, async (input) => {
  const result = await checkScan(getDb(), { pairId: input.pairId, side: input.side, slot: input.slot, code: input.code, chosen: input.chosen });
  if (!result.ok) return { ok: false, status: 409, message: result.reason };
  return { ok: true, data: { itemId: result.item.id, identity: result.item.identity, partType: result.item.partType ?? "" } };
});

/** Builds the two speakers; every scan is checked again in the one transaction that writes them. */
export const buildSpeakersAction = guardedAction("assembly.work", buildSchema, async (input, user) => {
  const { speakers } = await buildSpeakers(
    getDb(),
    { pairId: input.pairId, scans: input.scans, inspection: { clean: input.clean, inspected: input.inspected, note: input.note } },
    { id: user.id },
  );
  return {
    ok: true,
    message: `${input.pair} is built: ${speakers.L.identity} (left) and ${speakers.R.identity} (right). It waits for its final pair test.`,
    data: { left: speakers.L.identity, right: speakers.R.identity },
    // The pair's own page is not revalidated here: the form shows the speakers and their labels,
    // and the page reads the built pair on its next load.
    revalidate: [HOME],
  };
});

/** Pairs two finished lacquer cabinets of one model and colour, then opens the new pair. */
export const pairLacquerAction = guardedAction("assembly.work", pairLacquerSchema, async (input, user) => {
  const { pair } = await pairLacquerCabinets(getDb(), { left: input.left, right: input.right }, { id: user.id });
  return { ok: true, revalidate: [HOME], redirectTo: pairPage(pair.identity) };
});
