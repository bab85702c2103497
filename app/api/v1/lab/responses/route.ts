import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { MiB } from "@/lib/input/sizes";
import { labActor } from "@/lib/lab/principal";
import { batchByCode, importResponseFiles } from "@/lib/lab/units";

/** One request's files together: eight at the 2 MB a file may be, with room for JSON's escapes; more go in further requests. */
const BODY_LIMIT = 24 * MiB;

const body = z.object({
  /** Match the files' serials within this batch (its code); otherwise across the register. */
  batch: z.string().trim().min(1).max(40).optional(),
  files: z
    .array(z.object({ name: z.string().trim().min(1).max(200), text: z.string().max(2_000_000, "A response file is at most 2 MB.") }))
    .min(1, "Send at least one file.")
    .max(500, "At most 500 files at once."),
});

/**
 * Response files for many units at once, from the batch page or a test bench (machine token):
 * `{ batch?, files: [{ name, text }] }`. Each file names its unit by serial in its first line or
 * its name. All are checked first; if any is wrong nothing is saved and every problem is listed.
 */
export const POST = guardedRoute("lab.work", { body, machine: "lab", bodyLimit: BODY_LIMIT }, async ({ body, ...caller }) => {
  const db = getDb();
  const batch = body.batch ? await batchByCode(db, body.batch) : null;
  if (body.batch && !batch) throw new AppError(404, `There is no batch ${body.batch}.`);
  const saved = await importResponseFiles(db, body.files, { batchId: batch?.id, source: caller.machine ? "api" : "upload" }, labActor(caller));
  return Response.json({ saved }, { status: 201 });
});
