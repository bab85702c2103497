/**
 * Attachments of mail: queued with the message (what to make, not the bytes), listed with their
 * names, read back from what the stand-in SMTP server caught (parsed by mailparser, an independent
 * MIME parser), and served to the administrator as a download that is never sniffed.
 */
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { getDb } from "@/db";
import { users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { readAttachment, readMailbox } from "@/lib/mail/mailbox";
import { listOutbox, queueMail } from "@/lib/mail/outbox";
import { createMailTransport } from "@/lib/mail/transport";

const request = vi.hoisted(() => ({ sessionId: null as string | null }));
vi.mock("next/headers", async () => {
  const { SESSION_COOKIE } = await import("@/lib/auth/lucia-cookie");
  return {
    cookies: async () => ({
      get: (name: string) => (name === SESSION_COOKIE && request.sessionId ? { name, value: request.sessionId } : undefined),
      set: () => {},
    }),
    headers: async () => new Headers({ host: "localhost:3000" }),
  };
});
vi.mock("next/cache", () => ({ revalidatePath: () => {}, revalidateTag: () => {} }));
vi.mock("next/navigation", () => ({ redirect: () => { throw new Error("redirect"); }, forbidden: () => { throw new Error("forbidden"); }, notFound: () => { throw new Error("notFound"); } }));

const mailbox = mkdtempSync(join(process.env.TWINLEAF_TEST_DIR!, "caught-"));
process.env.MAILBOX_DIR = mailbox;
const { GET } = await import("@/app/api/v1/admin/mail/[id]/attachments/[index]/route");

let smtp: FakeSmtp;
let messageId = "";
// A few bytes that start like a PDF, and a CSV: what matters is that they come back unchanged.
const PDF = Buffer.from("%PDF-1.4\n% invented test bytes\n%%EOF\n");
const CSV = "serial,level\nD-TW-26-00501-4,86.2\n";

beforeAll(async () => {
  await seedDemo(getDb(), { history: false });
  smtp = await startFakeSmtp({ port: 0, dir: mailbox });
  const transport = createMailTransport({ smtp: { host: "127.0.0.1", port: smtp.port, secure: false }, from: "Twinleaf <no-reply@twinleaf.test>", mailboxDir: mailbox });
  await transport.sendMail({
    to: "dealer@example.test",
    subject: "Shipped: 1 matched pair",
    text: "See the attached certificate.",
    attachments: [
      { filename: "certificate-P-PW2-26-00042-W.pdf", content: PDF, contentType: "application/pdf" },
      { filename: "../levels.csv", content: CSV, contentType: "text/csv" },
    ],
  });
  transport.close();
  messageId = (await readMailbox(mailbox))[0]!.id;
}, 60_000);
afterAll(async () => smtp?.close());

async function signInAs(role: string | null) {
  if (!role) return void (request.sessionId = null);
  const [u] = await getDb().select({ id: users.id }).from(users).where(eq(users.email, `${role}@demo.twinleaf.test`));
  request.sessionId = (await startSession(u!.id, getDb())).session.id;
}

const get = (id: string, index: string) =>
  GET(new Request(`http://localhost:3000/api/v1/admin/mail/${id}/attachments/${index}`), { params: Promise.resolve({ id, index }) });

describe("the caught mailbox lists attachments", () => {
  test("each with its name (a plain name, never a path), type and size", async () => {
    const [message] = await readMailbox(mailbox);
    expect(message!.attachments).toEqual([
      { index: 0, filename: "certificate-P-PW2-26-00042-W.pdf", contentType: "application/pdf", size: PDF.byteLength },
      { index: 1, filename: "levels.csv", contentType: "text/csv", size: Buffer.byteLength(CSV) },
    ]);
  });

  test("readAttachment gives the bytes as sent, and null for an attachment or message that is not there", async () => {
    expect((await readAttachment(mailbox, messageId, 0))!.content.equals(PDF)).toBe(true);
    expect(await readAttachment(mailbox, messageId, 2)).toBeNull();
    expect(await readAttachment(mailbox, "0000000000000-000001-1.eml", 0)).toBeNull();
    expect(await readAttachment(mailbox, "../secrets.eml", 0)).toBeNull();
  });
});

describe("GET /api/v1/admin/mail/[id]/attachments/[index]", () => {
  test("the administrator downloads it: its bytes, its type, as an attachment, never sniffed", async () => {
    await signInAs("admin");
    const res = await get(messageId, "0");
    expect(res.status).toBe(200);
    expect(Buffer.from(await res.arrayBuffer()).equals(PDF)).toBe(true);
    expect(res.headers.get("content-type")).toBe("application/pdf");
    expect(res.headers.get("content-disposition")).toBe(`attachment; filename="certificate-P-PW2-26-00042-W.pdf"; filename*=UTF-8''certificate-P-PW2-26-00042-W.pdf`);
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("content-security-policy")).toContain("default-src 'none'");
  });

  test.each([
    ["an index past the last attachment", () => messageId, "2"],
    ["an index that is not a number", () => messageId, "x"],
    ["a message that was never caught", () => "0000000000000-000001-1.eml", "0"],
    ["a path instead of a message", () => "..%2F..%2Fetc%2Fpasswd", "0"],
  ])("%s: 404 with a plain message", async (_what, id, index) => {
    await signInAs("admin");
    const res = await get(id(), index);
    expect(res.status).toBe(404);
    expect(await res.json()).toEqual({ error: "No such attachment in the caught mail." });
  });

  test("signed out: 401; a packer: 403", async () => {
    await signInAs(null);
    expect((await get(messageId, "0")).status).toBe(401);
    await signInAs("packing");
    expect((await get(messageId, "0")).status).toBe(403);
  });
});

describe("queueMail takes attachments", () => {
  test("they are kept with the message and listed by name", async () => {
    const db = getDb();
    const id = await queueMail(db, { to: "dealer@example.test", subject: "With a file", text: "Attached.", attachments: [{ kind: "certificate", certificateId: "c-1", filename: "certificate-P-1.pdf" }] });
    const listed = (await listOutbox(db)).find((m) => m.id === id);
    expect(listed!.attachments).toEqual(["certificate-P-1.pdf"]);
  });

  test("a file name that is a path is refused, and nothing is queued", async () => {
    const db = getDb();
    const count = async () => (await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM outbox`))[0]!.n;
    const before = await count();
    await expect(queueMail(db, { to: "dealer@example.test", subject: "Bad", text: "x", attachments: [{ kind: "certificate", certificateId: "c-1", filename: "../x.pdf" }] })).rejects.toThrow(/plain name/);
    expect(await count()).toBe(before);
  });
});
