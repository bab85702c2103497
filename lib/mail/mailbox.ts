import { readdir, readFile, stat } from "node:fs/promises";
import { join, resolve } from "node:path";
import { simpleParser, type AddressObject } from "mailparser";

export interface MailboxMessage {
  /** The file name in the mailbox folder. */
  id: string;
  receivedAt: Date;
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string | null;
}

// Only names the fake server could have written: no separators, no leading dot, no "..".
const MESSAGE_ID = /^[A-Za-z0-9][A-Za-z0-9_-]*(\.[A-Za-z0-9_-]+)*\.eml$/;

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
