import { z } from "zod";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { contentDisposition, downloadName, readUploadBytes, UPLOAD_ID, uploadById, variantMime } from "@/lib/uploads";

const query = z.object({
  size: z.enum(["thumb"], { error: "size is thumb, or left out for the full file." }).optional(),
});
// Checked before any lookup, so nothing path-like ever reaches the database or the disk.
const uploadId = z.string().regex(UPLOAD_ID);

/** One stored file (or its preview), for any signed-in user. Served inline, never sniffed or run. */
export const GET = guardedRoute("register.read", { query }, async ({ params, query }) => {
  const id = uploadId.safeParse(params.id);
  if (!id.success) throw new AppError(400, "That is not an upload id.");
  const row = await uploadById(getDb(), id.data);
  if (!row) throw new AppError(404, "No such upload.");
  const variant = query.size === "thumb" ? "thumb" : "original";
  const bytes = await readUploadBytes(row, variant);
  return new Response(new Uint8Array(bytes), {
    headers: {
      "content-type": variantMime(row, variant),
      "content-length": String(bytes.byteLength),
      "content-disposition": contentDisposition(downloadName(row, variant)),
      "x-content-type-options": "nosniff",
      "cache-control": "private, max-age=3600",
      "content-security-policy": "default-src 'none'",
    },
  });
});
