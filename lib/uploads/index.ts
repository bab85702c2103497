import "server-only";
import type { Station } from "@/lib/vocabulary/stations";
// The one way a file enters Twinleaf. Every check runs on the bytes in memory before anything is
// written; then the files are written (temp name, then rename), then the row and its event in one
// short transaction. A failed transaction removes the files again, so a refusal leaves nothing.
import { createHash, randomBytes } from "node:crypto";
import { mkdir, readFile, rename, unlink, writeFile } from "node:fs/promises";
import { join, resolve, sep } from "node:path";
import { asc, and, eq, sql } from "drizzle-orm";
import { fileTypeFromBuffer } from "file-type";
import sharp, { type Metadata } from "sharp";
import type { DbOrTx } from "@/db";
import { uploads, type Upload } from "@/db/schema/uploads";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";

const MiB = 1024 * 1024;

/** The default limit for one file. */
export const MAX_UPLOAD_BYTES = 10 * MiB;
/** Beyond this many pixels an image is refused before it is decoded (a small file can unpack huge). */
export const MAX_IMAGE_PIXELS = 100_000_000;
/** Files in one storeUploads call (and so in one request). */
export const MAX_FILES_PER_BATCH = 12;
export const THUMB_MAX_PX = 320;
export const NAME_MAX = 120;
export const CAPTION_MAX = 500;

/** The shape of an upload id (newId(): 15 random bytes, base64url). Nothing else reaches the disk. */
export const UPLOAD_ID = /^[A-Za-z0-9_-]{20}$/;
const STORED_NAME = /^[A-Za-z0-9_-]{20}(?:\.thumb)?\.[a-z0-9]{1,8}$/;

/** A refusal of the file itself, with a message for the person who sent it. */
export class UploadError extends AppError {
  constructor(status: 400 | 404 | 413, message: string) {
    super(status, message);
    this.name = "UploadError";
  }
}

export type UploadAccept = "image";

const ACCEPTED: Record<UploadAccept, { mimes: ReadonlySet<string>; noun: string; ask: string }> = {
  image: { mimes: new Set(["image/jpeg", "image/png", "image/webp"]), noun: "a photo", ask: "send a JPEG, PNG or WebP" },
};

/** Where the bytes live: UPLOADS_DIR, or data/uploads under the working directory (outside public/). */
export function uploadsDir(): string {
  return resolve(/*turbopackIgnore: true*/ process.env.UPLOADS_DIR || join(process.cwd(), "data", "uploads"));
}

/** The absolute path of a stored name, refusing anything that is not a stored name or leaves the folder. */
function storedPath(dir: string, storedName: string): string {
  if (!STORED_NAME.test(storedName)) throw new Error(`refusing stored name ${JSON.stringify(storedName)}`);
  const path = resolve(/*turbopackIgnore: true*/ dir, storedName);
  if (!path.startsWith(dir + sep)) throw new Error(`refusing a path outside the uploads folder: ${path}`);
  return path;
}

const CONTROL = /[\u0000-\u001f\u007f-\u009f]/g;
// Direction overrides and isolates can make "gpj.exe" read as "exe.jpg".
const BIDI = /[\u202a-\u202e\u2066-\u2069\u200e\u200f]/g;

/** The user's file name, fit for display only: last path segment, no control characters, ≤ 120 characters. */
export function displayName(name: string, fallback = "photo"): string {
  const last = name.split(/[/\\]/).pop() ?? "";
  const clean = last.normalize("NFC").replace(CONTROL, "").replace(BIDI, "").trim();
  if (!clean || clean === "." || clean === "..") return fallback;
  return Array.from(clean).slice(0, NAME_MAX).join("");
}

function cleanCaption(caption: string | undefined): string {
  const clean = (caption ?? "").replace(CONTROL, " ").replace(BIDI, "").replace(/\s+/g, " ").trim();
  if (Array.from(clean).length > CAPTION_MAX) throw new UploadError(400, `The caption is longer than ${CAPTION_MAX} characters.`);
  return clean;
}

/** 12.4 MB, 10 MB, 900 KB, 12 bytes. */
export function formatSize(bytes: number): string {
  const trim = (n: number) => (Math.round(n * 10) / 10).toString();
  if (bytes >= MiB) return `${trim(bytes / MiB)} MB`;
  if (bytes >= 1024) return `${trim(bytes / 1024)} KB`;
  return `${bytes} ${bytes === 1 ? "byte" : "bytes"}`;
}

export interface UploadFile {
  name: string;
  bytes: Uint8Array;
}

export interface UploadOptions {
  subject: { kind: string; id: string };
  /** What it is for, e.g. "photo". */
  purpose: string;
  accept: UploadAccept;
  /** Per file; MAX_UPLOAD_BYTES when absent. */
  maxBytes?: number;
  caption?: string;
  actorId: string;
  station: Station;
}

export type UploadInput = UploadFile & UploadOptions;

interface Prepared {
  id: string;
  name: string;
  mime: string;
  storedName: string;
  thumbName: string;
  bytes: Buffer;
  sha256: string;
  width: number;
  height: number;
  thumb: Buffer;
}

/** Every check on one file, in memory. Throws UploadError naming the file; writes nothing. */
async function prepare(file: UploadFile, opts: UploadOptions): Promise<Prepared> {
  const name = displayName(file.name);
  const size = file.bytes.byteLength;
  const limit = opts.maxBytes ?? MAX_UPLOAD_BYTES;
  if (size === 0) throw new UploadError(400, `${name} is empty.`);
  if (size > limit) throw new UploadError(413, `${name} is ${formatSize(size)}; the limit is ${formatSize(limit)} a file.`);

  const accepted = ACCEPTED[opts.accept];
  const bytes = Buffer.from(file.bytes.buffer, file.bytes.byteOffset, file.bytes.byteLength);
  // The type is what the content says, never the name or the browser's word.
  const detected = await fileTypeFromBuffer(bytes);
  if (!detected || !accepted.mimes.has(detected.mime)) {
    const content = detected ? detected.mime : "not a recognised file type";
    throw new UploadError(400, `${name} is not ${accepted.noun}: its content is ${content}; ${accepted.ask}.`);
  }

  const unreadable = () => new UploadError(400, `${name} could not be read as an image: the file may be damaged or cut short. Try saving it again.`);
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch {
    throw unreadable();
  }
  if (!meta.width || !meta.height) throw unreadable();
  if (meta.width * meta.height > MAX_IMAGE_PIXELS) {
    throw new UploadError(413, `${name} is ${meta.width} × ${meta.height} pixels; the limit is ${MAX_IMAGE_PIXELS / 1_000_000} megapixels.`);
  }
  // As it is seen: EXIF orientation applied.
  const width = meta.autoOrient?.width ?? meta.width;
  const height = meta.autoOrient?.height ?? meta.height;
  let thumb: Buffer;
  try {
    // Decoding for the thumbnail reads the whole image, so a damaged or cut-short file fails here.
    thumb = await sharp(bytes, { failOn: "warning", limitInputPixels: MAX_IMAGE_PIXELS })
      .autoOrient()
      .resize(THUMB_MAX_PX, THUMB_MAX_PX, { fit: "inside", withoutEnlargement: true })
      .flatten({ background: "#ffffff" })
      .jpeg({ quality: 80 })
      .toBuffer();
  } catch {
    throw unreadable();
  }

  const id = newId();
  const ext = detected.ext === "jpeg" ? "jpg" : detected.ext;
  return {
    id,
    name,
    mime: detected.mime,
    storedName: `${id}.${ext}`,
    thumbName: `${id}.thumb.jpg`,
    bytes,
    sha256: createHash("sha256").update(bytes).digest("hex"),
    width,
    height,
    thumb,
  };
}

async function removeQuietly(path: string) {
  await unlink(path).catch((e: NodeJS.ErrnoException) => {
    if (e.code !== "ENOENT") console.error(`could not remove ${path}`, e);
  });
}

/** Writes under a temporary name, then renames, so a reader never sees half a file. */
async function writeAtomically(dir: string, storedName: string, data: Buffer, written: string[]) {
  const path = storedPath(dir, storedName);
  const tmp = join(dir, `.${storedName}.${randomBytes(6).toString("hex")}.tmp`);
  written.push(tmp);
  await writeFile(tmp, data, { flag: "wx", mode: 0o640 });
  written.push(path);
  await rename(tmp, path);
}

function checkOptions(opts: UploadOptions) {
  if (!/^[a-z][a-z0-9_.-]{0,39}$/.test(opts.purpose)) throw new UploadError(400, `"${opts.purpose}" is not an upload purpose.`);
  if (!opts.subject.kind || !opts.subject.id) throw new UploadError(400, "An upload must belong to something.");
  if (!ACCEPTED[opts.accept]) throw new UploadError(400, `Uploads of kind "${opts.accept}" are not accepted.`);
}

/**
 * Stores several files for one subject: all are checked first, and if any is refused nothing is
 * written and the message names that file. Returns the rows in the order given.
 */
export async function storeUploads(db: DbOrTx, files: UploadFile[], opts: UploadOptions): Promise<Upload[]> {
  checkOptions(opts);
  if (files.length === 0) throw new UploadError(400, "Choose at least one file.");
  if (files.length > MAX_FILES_PER_BATCH) throw new UploadError(400, `At most ${MAX_FILES_PER_BATCH} files at once; ${files.length} were sent.`);
  const caption = cleanCaption(opts.caption);
  const prepared: Prepared[] = [];
  for (const [i, file] of files.entries()) {
    try {
      prepared.push(await prepare(file, opts));
    } catch (e) {
      if (e instanceof UploadError && files.length > 1) {
        throw new UploadError(e.status as 400 | 413, `File ${i + 1} of ${files.length}: ${e.message} Nothing was saved.`);
      }
      throw e;
    }
  }

  const dir = uploadsDir();
  const written: string[] = [];
  try {
    await mkdir(dir, { recursive: true });
    for (const p of prepared) {
      await writeAtomically(dir, p.storedName, p.bytes, written);
      await writeAtomically(dir, p.thumbName, p.thumb, written);
    }
    // No file I/O from here: the transaction is short.
    return await db.transaction(async (tx) => {
      const rows: Upload[] = [];
      for (const p of prepared) {
        const eventId = await appendEvent(tx, {
          actorId: opts.actorId,
          station: opts.station,
          type: "upload.stored",
          subjectKind: opts.subject.kind,
          subjectId: opts.subject.id,
          data: { uploadId: p.id, name: p.name, mime: p.mime, bytes: p.bytes.byteLength, purpose: opts.purpose },
        });
        const [row] = await tx
          .insert(uploads)
          .values({
            id: p.id,
            subjectKind: opts.subject.kind,
            subjectId: opts.subject.id,
            purpose: opts.purpose,
            originalName: p.name,
            storedName: p.storedName,
            mime: p.mime,
            bytes: p.bytes.byteLength,
            sha256: p.sha256,
            width: p.width,
            height: p.height,
            thumbName: p.thumbName,
            caption,
            uploadedBy: opts.actorId,
            eventId,
          })
          .returning();
        rows.push(row!);
      }
      return rows;
    });
  } catch (e) {
    await Promise.all(written.map(removeQuietly));
    throw e;
  }
}

/** Stores one file; see storeUploads. */
export async function storeUpload(db: DbOrTx, input: UploadInput): Promise<Upload> {
  const { name, bytes, ...opts } = input;
  const [row] = await storeUploads(db, [{ name, bytes }], opts);
  return row!;
}

/** A subject's uploads, oldest first (in the order they were sent within one batch). */
export async function listUploads(db: DbOrTx, subject: { kind: string; id: string }, purpose?: string): Promise<Upload[]> {
  return db
    .select()
    .from(uploads)
    .where(and(eq(uploads.subjectKind, subject.kind), eq(uploads.subjectId, subject.id), purpose ? eq(uploads.purpose, purpose) : undefined))
    .orderBy(asc(uploads.createdAt), asc(sql`rowid`));
}

/** One upload by id, or null; an id of the wrong shape is simply not found. */
export async function uploadById(db: DbOrTx, id: string): Promise<Upload | null> {
  if (!UPLOAD_ID.test(id)) return null;
  const [row] = await db.select().from(uploads).where(eq(uploads.id, id)).limit(1);
  return row ?? null;
}

export type UploadVariant = "original" | "thumb";

/** The stored bytes of an upload or its thumbnail. */
export async function readUploadBytes(row: Upload, variant: UploadVariant): Promise<Buffer> {
  const storedName = variant === "thumb" ? row.thumbName : row.storedName;
  if (!storedName) throw new UploadError(404, "This file has no preview.");
  try {
    return await readFile(storedPath(uploadsDir(), storedName));
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ENOENT") {
      console.error(`upload ${row.id}: ${storedName} is missing from ${uploadsDir()}`);
      throw new UploadError(404, "The file of this upload is missing from storage. Tell an administrator.");
    }
    throw e;
  }
}

/** The content type served for a variant. */
export function variantMime(row: Upload, variant: UploadVariant): string {
  return variant === "thumb" ? "image/jpeg" : row.mime;
}

const EXT_FOR_MIME: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp" };

/** The name offered to the browser: the user's name, with an extension that matches the content. */
export function downloadName(row: Upload, variant: UploadVariant): string {
  const mime = variantMime(row, variant);
  const ext = EXT_FOR_MIME[mime];
  let base = row.originalName;
  if (variant === "thumb") base = `preview-${base}`;
  if (!ext) return base;
  const current = /\.([^.]+)$/.exec(base)?.[1]?.toLowerCase();
  const same = current === ext || (ext === "jpg" && current === "jpeg");
  return same ? base : `${base.replace(/\.[^.]*$/, "") || base}.${ext}`;
}

/** `inline; filename="ascii"; filename*=UTF-8''percent-encoded` (RFC 6266 / RFC 8187). */
export function contentDisposition(fileName: string, disposition: "inline" | "attachment" = "inline"): string {
  const ascii = fileName.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_") || "file";
  const encoded = encodeURIComponent(fileName).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `${disposition}; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
