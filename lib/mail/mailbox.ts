import { readdir, readFile, stat } from "node:fs/promises";
import { join, resolve } from "node:path";
import { simpleParser, type AddressObject } from "mailparser";

/** A file a caught message carries, described without its bytes. */
export interface MailboxAttachment {
  /** Its place among the message's attachments, 0 first: what the download names. */
  index: number;
  /** The name it was sent under, or "attachment-1"… when it had none. */
  filename: string;
  /** The MIME type its part declares, e.g. "application/pdf". */
  contentType: string;
  /** Decoded size in bytes. */
  size: number;
}

export interface MailboxMessage {
  /** The file name in the mailbox folder. */
  id: string;
  receivedAt: Date;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  attachments: MailboxAttachment[];
}

// Only names the fake server could have written: no separators, no leading dot, no "..".
const MESSAGE_ID = /^[A-Za-z0-9][A-Za-z0-9_-]*(\.[A-Za-z0-9_-]+)*\.eml$/;

/** True for a name the stand-in server could have given a message; anything path-like is not. */
export const isMessageId = (id: string): boolean => MESSAGE_ID.test(id);

// A declared type is used only when it is a plain type/subtype; a header could carry anything.
const plainType = (type: string | undefined) => (type && /^[a-z0-9][a-z0-9!#$&^_.+-]*\/[a-z0-9][a-z0-9!#$&^_.+-]*$/i.test(type) ? type.toLowerCase() : "application/octet-stream");

// Only the last path segment, and nothing a header or a file system could misread.
const plainName = (name: string | undefined, index: number) => {
  const base = (name ?? "").split(/[\\/]/).pop()!.replace(/[\u0000-\u001f\u007f]/g, "").trim();
  return base || `attachment-${index + 1}`;
};

const addresses = (a: AddressObject | AddressObject[] | undefined) =>
  (Array.isArray(a) ? a : a ? [a] : []).map((x) => x.text).join(", ");

async function parseFile(dir: string, id: string): Promise<MailboxMessage> {
  const path = join(dir, id);
  const [raw, info] = await Promise.all([readFile(path), stat(path)]);
  const mail = await simpleParser(raw);
  return {
    id,
    receivedAt: info.mtime,
    from: addresses(mail.from),
    to: addresses(mail.to),
    subject: mail.subject ?? "",
    text: mail.text ?? "",
    html: mail.html || null,
    attachments: mail.attachments.map((a, index) => ({ index, filename: plainName(a.filename, index), contentType: plainType(a.contentType), size: a.size ?? a.content.byteLength })),
  };
}

const isMissing = (e: unknown) => (e as { code?: string } | null)?.code === "ENOENT";

/** The messages in the folder, newest first (file names sort by arrival); none if it does not exist. */
export async function readMailbox(dir: string, opts: { limit?: number } = {}): Promise<MailboxMessage[]> {
  const root = resolve(/*turbopackIgnore: true*/ dir);
  let names: string[];
  try {
    names = await readdir(root);
  } catch (e) {
    if (isMissing(e)) return [];
    throw e;
  }
  const ids = names.filter((n) => MESSAGE_ID.test(n)).sort().reverse().slice(0, opts.limit ?? 50);
  const read = await Promise.all(
    ids.map((id) =>
      parseFile(root, id).catch((e: unknown) => {
        // Removed between the listing and the read: skip it rather than fail the whole list.
        if (isMissing(e)) return null;
        throw e;
      }),
    ),
  );
  return read.filter((m): m is MailboxMessage => m !== null);
}

/** One attachment of a caught message with its bytes, or null when the message or the attachment is not there. */
export async function readAttachment(dir: string, id: string, index: number): Promise<(MailboxAttachment & { content: Buffer }) | null> {
  if (!MESSAGE_ID.test(id) || !Number.isInteger(index) || index < 0) return null;
  let raw: Buffer;
  try {
    raw = await readFile(join(resolve(/*turbopackIgnore: true*/ dir), id));
  } catch (e) {
    if (isMissing(e)) return null;
    throw e;
  }
  const a = (await simpleParser(raw)).attachments[index];
  if (!a) return null;
  return { index, filename: plainName(a.filename, index), contentType: plainType(a.contentType), size: a.content.byteLength, content: a.content };
}

/** One message by its file name, or null if there is none. Anything but a plain file name is refused. */
export async function readMessage(dir: string, id: string): Promise<MailboxMessage | null> {
  if (!MESSAGE_ID.test(id)) throw new Error("not a message id");
  try {
    return await parseFile(resolve(/*turbopackIgnore: true*/ dir), id);
  } catch (e) {
    if (isMissing(e)) return null;
    throw e;
  }
}

const TYPE_WORDS: Record<string, string> = {
  "application/pdf": "PDF document",
  "text/plain": "Plain text",
  "text/csv": "CSV table",
  "text/calendar": "Calendar entry",
  "application/json": "JSON data",
  "image/png": "PNG image",
  "image/jpeg": "JPEG image",
  "image/webp": "WebP image",
  "application/zip": "ZIP archive",
};

/** An attachment's type as people say it ("PDF document"); an unusual type is shown as declared. */
export const attachmentTypeWords = (contentType: string): string => TYPE_WORDS[contentType] ?? contentType;
