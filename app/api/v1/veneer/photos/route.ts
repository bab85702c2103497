import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { readFormCapped } from "@/lib/input/body";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { normaliseScan } from "@/lib/serials";
import { CAPTION_MAX, formatSize, MAX_FILES_PER_BATCH, MAX_UPLOAD_BYTES, storeUploads } from "@/lib/uploads";

/** The largest body accepted: every file at the limit, plus room for the form's other fields. */
const MAX_BODY_BYTES = MAX_FILES_PER_BATCH * MAX_UPLOAD_BYTES + 256 * 1024;
const PHOTO_KINDS = new Set(["flitch", "leaf"]);

const fields = z.object({
  identity: z.string({ error: "Name the flitch or leaf (its serial)." }).transform(normaliseScan).pipe(z.string().min(1, "Name the flitch or leaf (its serial).").max(64, "That serial is too long.")),
  caption: z.string().max(CAPTION_MAX, `The caption is at most ${CAPTION_MAX} characters.`).optional(),
});

const tooLarge = (_limit: number, declared: number | null) =>
  `The upload is ${declared === null ? "too large" : formatSize(declared)}; at most ${MAX_FILES_PER_BATCH} photos of ${formatSize(MAX_UPLOAD_BYTES)} each can be sent at once.`;

/**
 * Photos of a flitch or a leaf (multipart: identity, caption?, one or more file). Every photo is
 * checked before any is kept; the answer is 201 with what was stored.
 */
export const POST = guardedRoute("veneer.work", {}, async ({ req, user }) => {
  // 415 when not multipart, 413 past the limit (declared or counted while reading), 400 when unreadable.
  const form = await readFormCapped(req, MAX_BODY_BYTES, tooLarge);

  const parsed = fields.safeParse({ identity: form.get("identity") ?? undefined, caption: form.get("caption") ?? undefined });
  if (!parsed.success) {
    const fieldErrors = z.flattenError(parsed.error).fieldErrors as Record<string, string[]>;
    throw new AppError(400, Object.values(fieldErrors).flat()[0] ?? "Some fields need attention.", fieldErrors);
  }
  const files = form.getAll("file").filter((f): f is File => typeof f !== "string");
  if (files.length === 0) throw new AppError(400, "Choose at least one photo.", { file: ["Choose at least one photo."] });

  const db = getDb();
  const item = await itemByIdentity(db, parsed.data.identity);
  if (!item) throw new AppError(404, `No item with the serial ${parsed.data.identity}.`);
  if (!PHOTO_KINDS.has(item.kind)) throw new AppError(400, `${item.identity} is a ${item.kind.replace(/_/g, " ")}; photos here are for flitches and leaves.`);

  const rows = await storeUploads(
    db,
    await Promise.all(files.map(async (f) => ({ name: f.name, bytes: new Uint8Array(await f.arrayBuffer()) }))),
    { subject: { kind: "item", id: item.id }, purpose: "photo", accept: "image", caption: parsed.data.caption, actorId: user.id, station: "veneer" },
  );
  return Response.json({ uploads: rows.map((r) => ({ id: r.id, name: r.originalName, width: r.width, height: r.height })) }, { status: 201 });
});
