import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
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

/** Reads the body, stopping as soon as it passes the limit (a missing or false Content-Length cannot get past). */
async function readCapped(req: Request, limit: number): Promise<Uint8Array<ArrayBuffer>> {
  const chunks: Uint8Array[] = [];
  let total = 0;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      total += value.byteLength;
      if (total > limit) {
        await reader.cancel().catch(() => undefined);
        throw tooLarge(total);
      }
      chunks.push(value);
    }
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

const tooLarge = (bytes: number) =>
  new AppError(413, `The upload is ${formatSize(bytes)}; at most ${MAX_FILES_PER_BATCH} photos of ${formatSize(MAX_UPLOAD_BYTES)} each can be sent at once.`);

/**
 * Photos of a flitch or a leaf (multipart: identity, caption?, one or more file). Every photo is
 * checked before any is kept; the answer is 201 with what was stored.
 */
export const POST = guardedRoute("veneer.work", {}, async ({ req, user }) => {
  const type = req.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data\s*;/i.test(type)) throw new AppError(415, "Send the photos as a multipart form (multipart/form-data).");
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > MAX_BODY_BYTES) throw tooLarge(declared);

  let form: FormData;
  const body = await readCapped(req, MAX_BODY_BYTES);
  try {
    form = await new Response(body, { headers: { "content-type": type } }).formData();
  } catch {
    throw new AppError(400, "The form could not be read. Choose the photos again and resend.");
  }

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
