import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { readMailConfig } from "@/lib/mail/config";
import { isMessageId, readAttachment } from "@/lib/mail/mailbox";
import { contentDisposition } from "@/lib/uploads";

const NOT_FOUND = "No such attachment in the caught mail.";

/**
 * One attachment of a message the demo's stand-in SMTP server caught, for the administrator.
 * Always a download (Content-Disposition: attachment), never sniffed or run, whatever type the
 * message declared for it: the bytes came from outside the register.
 */
export const GET = guardedRoute("admin.mail", {}, async ({ params }) => {
  const id = String(params.id ?? "");
  const index = String(params.index ?? "");
  // Checked before anything touches the disk: a plain message file name and a small whole number.
  if (!isMessageId(id) || !/^\d{1,3}$/.test(index)) throw new AppError(404, NOT_FOUND);
  const file = await readAttachment(readMailConfig().mailboxDir, id, Number(index));
  if (!file) throw new AppError(404, NOT_FOUND);
  return new Response(new Uint8Array(file.content), {
    headers: {
      "content-type": file.contentType,
      "content-length": String(file.content.byteLength),
      "content-disposition": contentDisposition(file.filename, "attachment"),
      "x-content-type-options": "nosniff",
      "content-security-policy": "default-src 'none'; sandbox",
      "cache-control": "private, no-store",
    },
  });
});
