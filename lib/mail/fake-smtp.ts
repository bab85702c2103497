import { mkdirSync } from "node:fs";
import { rename, writeFile } from "node:fs/promises";
import type { AddressInfo } from "node:net";
import { join, resolve } from "node:path";
import { SMTPServer } from "smtp-server";

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

const MAX_MESSAGE_BYTES = 25 * 1024 * 1024;

/**
 * A local SMTP server for development and tests: it accepts any sender, recipient and
 * credentials and writes each message, raw, to `dir` as `<ms since epoch>-<counter>.eml`, so
 * file names sort by arrival. Nothing is relayed anywhere. Port 0 picks a free port.
 */
export async function startFakeSmtp(opts: { port?: number; host?: string; dir: string }): Promise<FakeSmtp> {
  const dir = resolve(opts.dir);
  mkdirSync(dir, { recursive: true });
  let counter = 0;
  let lastMs = 0;

  // Written under a temporary name and renamed, so a reader never sees half a message.
  const store = async (raw: Buffer) => {
    // A clock step backwards must not make a newer message sort before an older one.
    const ms = Math.max(Date.now(), lastMs);
    lastMs = ms;
    const name = `${String(ms).padStart(13, "0")}-${String(++counter).padStart(6, "0")}-${process.pid}.eml`;
    const part = join(dir, `.${name}.part`);
    await writeFile(part, raw, { flag: "wx" });
    await rename(part, join(dir, name));
  };

  const server = new SMTPServer({
    authOptional: true,
    // No TLS at all: it is a loopback test server, and this also keeps smtp-server from
    // offering its built-in demo certificate.
    disabledCommands: ["STARTTLS"],
    allowInsecureAuth: true,
    size: MAX_MESSAGE_BYTES,
    logger: false,
    onAuth(auth, _session, callback) {
      callback(null, { user: auth.username ?? "anyone" });
    },
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (e) => callback(e));
      stream.on("end", () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error("message too large"), { responseCode: 552 }));
          return;
        }
        store(Buffer.concat(chunks)).then(
          () => callback(),
          (e: unknown) => callback(e instanceof Error ? e : new Error(String(e))),
        );
      });
    },
  });
  // A client dropping its connection surfaces here; it must not bring the process down.
  server.on("error", (e) => console.error(`fake SMTP: ${e.message}`));

  await new Promise<void>((ok, fail) => {
    const onError = (e: Error) => fail(e);
    server.server.once("error", onError);
    server.listen(opts.port ?? 2525, opts.host ?? "127.0.0.1", () => {
      server.server.off("error", onError);
      ok();
    });
  });

  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    close: () => new Promise<void>((ok) => server.close(() => ok())),
  };
}
