import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { KiB } from "@/lib/input/sizes";
import { labActor } from "@/lib/lab/principal";
import { batchByCode, importTsRows } from "@/lib/lab/units";

const num = z.number().finite().nullable().optional().transform((v) => v ?? null);
/** 1,000 units of a serial and seven numbers each, about 200 bytes a unit in JSON, with room to spare. */
const BODY_LIMIT = 512 * KiB;

const body = z.object({
  batch: z.string().trim().min(1).max(40).optional(),
  units: z
    .array(z.object({ serial: z.string().trim().min(1).max(60), fs: num, qts: num, qes: num, qms: num, re: num, vas: num, sensitivity: num }))
    .min(1, "Send at least one unit.")
    .max(1000, "At most 1,000 units at once."),
});

/**
 * Thiele–Small parameters for many units, from a test bench (machine token) or a session:
 * `{ batch?, units: [{ serial, fs, qts, qes, qms, re, vas, sensitivity }] }` (Hz, Ω, litres, dB).
 * Every unit is checked first; nothing is saved if any is wrong.
 */
export const POST = guardedRoute("lab.work", { body, machine: "lab", bodyLimit: BODY_LIMIT }, async ({ body, ...caller }) => {
  const db = getDb();
  const batch = body.batch ? await batchByCode(db, body.batch) : null;
  if (body.batch && !batch) throw new AppError(404, `There is no batch ${body.batch}.`);
  const rows = body.units.map((u, i) => ({ line: i + 1, serial: u.serial, ts: { fsHz: u.fs, qts: u.qts, qes: u.qes, qms: u.qms, reOhm: u.re, vasL: u.vas, sensitivityDb: u.sensitivity } }));
  const saved = await importTsRows(db, rows, { batchId: batch?.id, source: "api" }, labActor(caller));
  return Response.json({ saved }, { status: 201 });
});
