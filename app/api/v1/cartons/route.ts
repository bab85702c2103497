import { z } from "zod";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { packPair } from "@/lib/dispatch";

// Types only: whether each scan is the right speaker or accessory is lib/dispatch's to judge, per field, in words.
const body = z.object({
  pair: z.string({ error: "pair is the serial of the pair to pack." }).max(60),
  left: z.string({ error: "left is the serial scanned on the left speaker." }).max(80),
  right: z.string({ error: "right is the serial scanned on the right speaker." }).max(80),
  scans: z.array(z.string().max(80), { error: "scans lists the codes scanned for the coded accessories, in packing order." }).max(40).default([]),
  checked: z.array(z.string().max(100), { error: "checked lists the ticked lines without a code." }).max(40).default([]),
  location: z.string({ error: "location says where the carton is stored." }).max(60),
});

/**
 * Packs a pair by what was scanned (for a packing bench's scanner): the server checks each
 * speaker's serial, each accessory's code and the ticks, as the pack page does. 201 with the
 * carton's serial and SSCC; a refusal is 4xx with each wrong field named, and nothing is written.
 */
export const POST = guardedRoute("packing.work", { body }, async ({ body, user }) => {
  const r = await packPair(getDb(), { pairIdentity: body.pair, left: body.left, right: body.right, scans: body.scans, checked: body.checked, location: body.location }, { id: user.id });
  return Response.json({ pair: r.pair.identity, carton: r.carton.identity, sscc: r.sscc, location: r.location }, { status: 201 });
});
