/**
 * The stand-in SMTP server when its port is taken (a second demo beside a first): it refuses with
 * a plain message, or, when asked, listens on a free port instead and says so, and still catches
 * what is sent to it.
 */
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import nodemailer from "nodemailer";
import { afterEach, describe, expect, test } from "vitest";
import { readMailbox } from "@/lib/mail/mailbox";
import { SmtpPortTakenError, startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";

const dir = (name: string) => mkdtempSync(join(process.env.TWINLEAF_TEST_DIR ?? "/tmp", `${name}-`));
const open: FakeSmtp[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((s) => s.close()));
});
const start = async (opts: Parameters<typeof startFakeSmtp>[0]) => {
  const s = await startFakeSmtp(opts);
  open.push(s);
  return s;
};

describe("a stand-in SMTP server on a taken port", () => {
  test("refuses with a plain message when the port was chosen", async () => {
    const first = await start({ port: 0, dir: dir("first") });
    const refused = await startFakeSmtp({ port: first.port, dir: dir("second") }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(SmtpPortTakenError);
    expect((refused as Error).message).toBe(`Port ${first.port} on 127.0.0.1 is already in use, so the stand-in SMTP server cannot listen there.`);
  });

  test("takes a free port when allowed, says which it left, and catches mail there", async () => {
    const first = await start({ port: 0, dir: dir("first") });
    const mailbox = dir("second");
    const second = await start({ port: first.port, dir: mailbox, orFreePort: true });
    expect(second.port).not.toBe(first.port);
    expect(second.port).toBeGreaterThan(0);
    expect(second.movedFrom).toBe(first.port);

    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: second.port, secure: false, ignoreTLS: true });
    await transport.sendMail({ from: "no-reply@twinleaf.test", to: "wren@twinleaf.test", subject: "Second demo", text: "Caught by the second stand-in." });
    const inbox = await readMailbox(mailbox);
    expect(inbox.map((m) => m.subject)).toEqual(["Second demo"]);
  });

  test("a free port is not moved", async () => {
    const s = await start({ port: 0, dir: dir("free"), orFreePort: true });
    expect(s.movedFrom).toBeUndefined();
  });
});
