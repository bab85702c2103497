/**
 * Request bodies read with a ceiling: a body over its route's limit is refused by its declared
 * Content-Length before a byte is read, and cut off while streaming when it has none (a chunked
 * body) or holds more than it declared. Web-standard Request only, so the guard and tests share it.
 */
import { AppError } from "@/lib/auth/errors";
import { readWholeNumber } from "./numbers";
import { formatSize, KiB, MiB } from "./sizes";

/** A JSON route's body unless it declares more: ample for serials, plans and forms. */
export const DEFAULT_BODY_LIMIT = 64 * KiB;

/** Server actions (next.config.mjs `experimental.serverActions.bodySizeLimit`, the same number): a 2 MB file and its form. */
export const ACTION_BODY_LIMIT = 3 * MiB;

export type TooLarge = (limit: number, declared: number | null) => string;

export const tooLargeMessage: TooLarge = (limit, declared) =>
  declared !== null
    ? `The request is ${formatSize(declared)}; at most ${formatSize(limit)} can be sent here. Nothing was saved.`
    : `The request is larger than the ${formatSize(limit)} that can be sent here. Nothing was saved.`;

/** The Content-Length a request declares, or null when it declares none (or one that is not a number). */
export function declaredLength(headers: Headers): number | null {
  const raw = headers.get("content-length");
  return raw === null ? null : readWholeNumber(raw);
}

/** The whole body, or AppError 413 as soon as it is known to pass `limit` bytes. */
export async function readCapped(req: Request, limit: number, message: TooLarge = tooLargeMessage): Promise<Uint8Array<ArrayBuffer>> {
  const declared = declaredLength(req.headers);
  if (declared !== null && declared > limit) throw new AppError(413, message(limit, declared));
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
        throw new AppError(413, message(limit, null));
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

const utf8 = new TextDecoder("utf-8", { fatal: true });

/** A JSON body within `limit`: 413 when larger, 400 when it is not UTF-8 JSON. */
export async function readJsonCapped(req: Request, limit: number, message?: TooLarge): Promise<unknown> {
  const bytes = await readCapped(req, limit, message);
  try {
    return JSON.parse(utf8.decode(bytes));
  } catch {
    throw new AppError(400, "The body must be JSON.");
  }
}

/** A multipart form within `limit`: 415 when it is not one, 413 when larger, 400 when it cannot be read. */
export async function readFormCapped(req: Request, limit: number, message?: TooLarge): Promise<FormData> {
  const type = req.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data\s*;/i.test(type)) throw new AppError(415, "Send this as a multipart form (multipart/form-data).");
  const bytes = await readCapped(req, limit, message);
  try {
    return await new Response(bytes, { headers: { "content-type": type } }).formData();
  } catch {
    throw new AppError(400, "The form could not be read. Choose the files again and resend.");
  }
}
