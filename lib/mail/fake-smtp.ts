import { mkdirSync } from "node:fs";
import { rename, writeFile } from "node:fs/promises";
import type { AddressInfo } from "node:net";
import { join, resolve } from "node:path";
import { SMTPServer } from "smtp-server";

export interface FakeSmtp {
  port: number;
  /** The port asked for, when it was taken and a free one was used instead (see `orFreePort`). */
  movedFrom?: number;
  close(): Promise<void>;
}

/** The port asked for is used by another program (often another demo's stand-in). */
export class SmtpPortTakenError extends Error {
  constructor(
    readonly host: string,
    readonly port: number,
  ) {
    super(`Port ${port} on ${host} is already in use, so the stand-in SMTP server cannot listen there.`);
    this.name = "SmtpPortTakenError";
  }
}

const MAX_MESSAGE_BYTES = 25 * 1024 * 1024;

/**
 * A local SMTP server for development and tests: it accepts any sender, recipient and
 * credentials and writes each message, raw, to `dir` as `<ms since epoch>-<counter>.eml`, so
 * file names sort by arrival. Nothing is relayed anywhere. Port 0 picks a free port; with
 * `orFreePort`, so does a port that turns out to be taken (the caller must then tell its app).
 */
export async function startFakeSmtp(opts: { port?: number; host?: string; dir: string; orFreePort?: boolean }): Promise<FakeSmtp> {
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
  // A client dropping its connection surfaces here; it must not bring the process down. Errors
  // before listening (a taken port) are the caller's to report.
  let listening = false;
  server.on("error", (e) => {
    if (listening) console.error(`fake SMTP: ${e.message}`);
  });

  const host = opts.host ?? "127.0.0.1";
  const listen = (port: number) =>
    new Promise<void>((ok, fail) => {
      const onError = (e: Error) => fail(e);
      server.server.once("error", onError);
      server.listen(port, host, () => {
        server.server.off("error", onError);
        ok();
      });
    });
  const asked = opts.port ?? 2525;
  let movedFrom: number | undefined;
  try {
    await listen(asked);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== "EADDRINUSE") throw e;
    if (!opts.orFreePort || asked === 0) throw new SmtpPortTakenError(host, asked);
    movedFrom = asked;
    await listen(0);
  }

  listening = true;
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    ...(movedFrom === undefined ? {} : { movedFrom }),
    close: () => new Promise<void>((ok) => server.close(() => ok())),
  };
}
