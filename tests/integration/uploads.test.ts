import { existsSync, mkdtempSync, readdirSync } from "node:fs";
import { join, resolve } from "node:path";
import { eq, sql } from "drizzle-orm";
import sharp from "sharp";
import { beforeAll, beforeEach, describe, expect, test, vi } from "vitest";
import { getDb } from "@/db";
import { events, uploads, userRoles, users, type Item } from "@/db/schema";
import type { Role } from "@/lib/auth/roles";
import { startSession } from "@/lib/auth/sessions";
import { newId } from "@/lib/auth/tokens";
import { createItem } from "@/lib/genealogy/graph";
import { formatSerial } from "@/lib/serials";
import {
  contentDisposition,
  displayName,
  listUploads,
  MAX_UPLOAD_BYTES,
  readUploadBytes,
  storeUpload,
  storeUploads,
  uploadById,
  UploadError,
} from "@/lib/uploads";
import { failureText } from "./helpers";
import { request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

// Every read of the disk goes through this spy, so a test can say the disk was never touched.
const fsReads = vi.hoisted(() => ({ paths: [] as string[] }));
vi.mock("node:fs/promises", async (importOriginal) => {
  const real = await importOriginal<typeof import("node:fs/promises")>();
  const readFile = (async (path: Parameters<typeof real.readFile>[0], ...rest: unknown[]) => {
    fsReads.paths.push(String(path));
    return (real.readFile as (...a: unknown[]) => Promise<unknown>)(path, ...rest);
  }) as typeof real.readFile;
  return { ...real, default: { ...real, readFile }, readFile };
});

const { GET } = await import("@/app/api/v1/uploads/[id]/route");
const { POST } = await import("@/app/api/v1/veneer/photos/route");

const db = () => getDb();
const DIR = mkdtempSync(join(process.env.TWINLEAF_TEST_DIR ?? "/tmp", "uploads-"));
process.env.UPLOADS_DIR = DIR;

let veneerUser: string;
let labUser: string;
let flitch: Item;
let leaf: Item;
let cabinet: Item;

async function makeUser(name: string, role: Role) {
  const id = newId();
  await db().insert(users).values({ id, email: `${name}.${id.slice(0, 6)}@workshop.twinleaf.test`, name, passwordHash: null });
  await db().insert(userRoles).values({ userId: id, role });
  return id;
}

async function signInAs(userId: string | null) {
  request.sessionId = userId ? (await startSession(userId, db())).session.id : null;
}

/** A generated test picture: a gradient from raw pixels (never a real photo). */
async function picture(format: "png" | "jpeg" | "webp", width = 64, height = 48, orientation?: number) {
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) raw.set([(x * 255) / width, (y * 255) / height, 128], (y * width + x) * 3);
  let img = sharp(raw, { raw: { width, height, channels: 3 } });
  if (orientation) img = img.withMetadata({ orientation });
  return new Uint8Array(await img.toFormat(format).toBuffer());
}

const PDF = new TextEncoder().encode("%PDF-1.4\n1 0 obj << /Type /Catalog /Pages 2 0 R >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n");
const TEXT = new TextEncoder().encode("Walnut crotch, leaves 1 to 24, bookmatched.\n");
const SVG = new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10"/></svg>');

const filesInDir = () => readdirSync(DIR).sort();
const uploadCount = async () => (await db().select({ n: sql<number>`count(*)` }).from(uploads))[0]!.n;
const storedEvents = async () => (await db().select({ n: sql<number>`count(*)` }).from(events).where(eq(events.type, "upload.stored")))[0]!.n;

/** The register, the event log and the folder as they are: a refusal must leave all three alone. */
async function state() {
  return { uploads: await uploadCount(), events: await storedEvents(), files: filesInDir() };
}

const by = () => ({ subject: { kind: "item", id: flitch.id }, purpose: "photo", accept: "image" as const, actorId: veneerUser, station: "veneer" as const });

beforeAll(async () => {
  veneerUser = await makeUser("Veneer", "veneer");
  labUser = await makeUser("Lab", "lab");
  const identity = formatSerial({ kind: "flitch", code: "WAL", year: 2026, seq: 1 });
  const recorder = { actorId: null, station: "admin" as const };
  flitch = await db().transaction((tx) => createItem(tx, { kind: "flitch", identity, state: "received" }, recorder));
  leaf = await db().transaction((tx) => createItem(tx, { kind: "leaf", identity: `${identity}/03`, state: "cut" }, recorder));
  cabinet = await db().transaction((tx) => createItem(tx, { kind: "cabinet", identity: "CAB-TEST-1", state: "built" }, recorder));
});

beforeEach(() => {
  fsReads.paths = [];
});

describe("storeUpload", () => {
  test("a good PNG is stored under a generated name, with a JPEG thumbnail, its size and an event", async () => {
    const bytes = await picture("png", 640, 480);
    const row = await storeUpload(db(), { ...by(), name: "flitch front.png", bytes, caption: "  Figure  at the\tbutt end " });

    expect(row).toMatchObject({ subjectKind: "item", subjectId: flitch.id, purpose: "photo", originalName: "flitch front.png", mime: "image/png", bytes: bytes.byteLength, width: 640, height: 480, caption: "Figure at the butt end", uploadedBy: veneerUser });
    expect(row.storedName).toBe(`${row.id}.png`);
    expect(row.thumbName).toBe(`${row.id}.thumb.jpg`);
    expect(row.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(filesInDir()).toEqual(expect.arrayContaining([row.storedName, row.thumbName]));
    expect(filesInDir().filter((f) => f.endsWith(".tmp"))).toEqual([]);

    const original = await readUploadBytes(row, "original");
    expect(Buffer.compare(original, Buffer.from(bytes))).toBe(0);
    const thumb = await sharp(await readUploadBytes(row, "thumb")).metadata();
    expect(thumb).toMatchObject({ format: "jpeg", width: 320, height: 240 });

    const [event] = await db().select().from(events).where(eq(events.id, row.eventId!));
    expect(event).toMatchObject({ type: "upload.stored", subjectKind: "item", subjectId: flitch.id, actorId: veneerUser, station: "veneer" as const });
    expect(event!.data).toEqual({ uploadId: row.id, name: "flitch front.png", mime: "image/png", bytes: bytes.byteLength, purpose: "photo" });

    expect((await listUploads(db(), { kind: "item", id: flitch.id }, "photo")).map((u) => u.id)).toContain(row.id);
    expect(await uploadById(db(), row.id)).toEqual(row);
  });

  test("JPEG and WebP are accepted; the size is as seen after the EXIF orientation, and so is the thumbnail", async () => {
    const jpeg = await storeUpload(db(), { ...by(), name: "side.jpg", bytes: await picture("jpeg", 400, 200, 6) });
    expect(jpeg).toMatchObject({ mime: "image/jpeg", width: 200, height: 400, storedName: `${jpeg.id}.jpg` });
    expect(await sharp(await readUploadBytes(jpeg, "thumb")).metadata()).toMatchObject({ width: 160, height: 320 });

    const webp = await storeUpload(db(), { ...by(), name: "edge.webp", bytes: await picture("webp", 30, 20) });
    expect(webp).toMatchObject({ mime: "image/webp", width: 30, height: 20, storedName: `${webp.id}.webp` });
    // A small picture is not enlarged.
    expect(await sharp(await readUploadBytes(webp, "thumb")).metadata()).toMatchObject({ width: 30, height: 20 });
  });

  test("an empty file is refused, and nothing is written", async () => {
    const before = await state();
    const err = await storeUpload(db(), { ...by(), name: "nothing.png", bytes: new Uint8Array() }).catch((e) => e);
    expect(err).toBeInstanceOf(UploadError);
    expect(err.message).toBe("nothing.png is empty.");
    expect(await state()).toEqual(before);
  });

  test("a file over the limit is refused with the limit and its size in MB, and nothing is written", async () => {
    const before = await state();
    const big = new Uint8Array(MAX_UPLOAD_BYTES + 2 * 1024 * 1024);
    big.set(await picture("png"));
    const err = await storeUpload(db(), { ...by(), name: "big.png", bytes: big }).catch((e) => e);
    expect(err).toBeInstanceOf(UploadError);
    expect(err.status).toBe(413);
    expect(err.message).toBe("big.png is 12 MB; the limit is 10 MB a file.");

    const small = await picture("png", 200, 200);
    const err2 = await storeUpload(db(), { ...by(), name: "small.png", bytes: small, maxBytes: 100 }).catch((e) => e);
    expect(err2.message).toMatch(/^small\.png is [\d.]+ (KB|bytes); the limit is 100 bytes a file\.$/);
    expect(await state()).toEqual(before);
  });

  test.each([
    ["leaf.jpg", TEXT, "leaf.jpg is not a photo: its content is not a recognised file type; send a JPEG, PNG or WebP."],
    ["report.pdf", PDF, "report.pdf is not a photo: its content is application/pdf; send a JPEG, PNG or WebP."],
    ["drawing.svg", SVG, "drawing.svg is not a photo: its content is not a recognised file type; send a JPEG, PNG or WebP."],
  ])("%s is refused as not a photo, and nothing is written", async (name, bytes, message) => {
    const before = await state();
    expect(await failureText(() => storeUpload(db(), { ...by(), name, bytes }))).toBe(message);
    expect(await state()).toEqual(before);
  });

  test("an image of another type (GIF) is refused, naming what it is", async () => {
    const gif = new Uint8Array(await sharp({ create: { width: 4, height: 4, channels: 3, background: "#806040" } }).gif().toBuffer());
    expect(await failureText(() => storeUpload(db(), { ...by(), name: "anim.png", bytes: gif }))).toBe(
      "anim.png is not a photo: its content is image/gif; send a JPEG, PNG or WebP.",
    );
  });

  test("a PNG cut short is refused as damaged, and nothing is written", async () => {
    const before = await state();
    const good = await picture("png", 300, 300);
    const cut = good.subarray(0, Math.floor(good.byteLength * 0.6));
    expect(await failureText(() => storeUpload(db(), { ...by(), name: "cut.png", bytes: cut }))).toMatch(/^cut\.png could not be read as an image/);
    expect(await state()).toEqual(before);
  });

  test.each([
    ["../../../etc/passwd.png", "passwd.png"],
    ["..\\..\\evil.png", "evil.png"],
    ["C:\\Users\\shop\\Pictures\\flitch.png", "flitch.png"],
    ["bad\u0000na\u001bme\u202e.png", "badname.png"],
    ["../..", "photo"],
    ["   ", "photo"],
  ])("the name %j is stored under a generated name inside the folder and shown as %j", async (name, shown) => {
    const row = await storeUpload(db(), { ...by(), name, bytes: await picture("png", 8, 8) });
    expect(row.originalName).toBe(shown);
    expect(row.storedName).toMatch(/^[A-Za-z0-9_-]{20}\.png$/);
    expect(existsSync(join(DIR, row.storedName))).toBe(true);
    expect(resolve(DIR, row.storedName).startsWith(DIR)).toBe(true);
    expect(existsSync(resolve(DIR, "../../../etc/passwd.png"))).toBe(false);
    expect(existsSync(resolve(DIR, "..", "evil.png"))).toBe(false);
    expect(existsSync(resolve(DIR, "../..", "evil.png"))).toBe(false);
  });

  test("a display name is capped at 120 characters", () => {
    expect(Array.from(displayName(`${"ü".repeat(200)}.png`)).length).toBe(120);
  });

  test("several files: one bad file keeps them all out, and the message names it", async () => {
    const before = await state();
    const files = [
      { name: "one.png", bytes: await picture("png") },
      { name: "two.jpg", bytes: TEXT },
      { name: "three.png", bytes: await picture("png") },
    ];
    expect(await failureText(() => storeUploads(db(), files, by()))).toBe(
      "File 2 of 3: two.jpg is not a photo: its content is not a recognised file type; send a JPEG, PNG or WebP. Nothing was saved.",
    );
    expect(await state()).toEqual(before);

    const rows = await storeUploads(db(), [files[0]!, files[2]!], { ...by(), subject: { kind: "item", id: leaf.id } });
    expect(rows.map((r) => r.originalName)).toEqual(["one.png", "three.png"]);
    expect((await listUploads(db(), { kind: "item", id: leaf.id })).map((r) => r.id)).toEqual(rows.map((r) => r.id));
  });

  test("when the transaction fails, the written files are removed again", async () => {
    const before = await state();
    // An actor that does not exist breaks the foreign key inside the transaction, after the files were written.
    const err = await storeUpload(db(), { ...by(), actorId: "no-such-user", name: "orphan.png", bytes: await picture("png") }).catch((e) => e);
    expect(err).toBeInstanceOf(Error);
    expect(await state()).toEqual(before);
  });

  test("uploads are appended, never changed", async () => {
    const row = await storeUpload(db(), { ...by(), name: "kept.png", bytes: await picture("png", 8, 8) });
    expect(await failureText(() => db().update(uploads).set({ caption: "changed" }).where(eq(uploads.id, row.id)))).toMatch(/never changed/);
    expect(await failureText(() => db().delete(uploads).where(eq(uploads.id, row.id)))).toMatch(/never deleted/);
  });

  test("a row whose stored name is path-like is never read (defence in depth)", async () => {
    const row = await storeUpload(db(), { ...by(), name: "real.png", bytes: await picture("png", 8, 8) });
    fsReads.paths = [];
    await expect(readUploadBytes({ ...row, storedName: "../../etc/passwd" }, "original")).rejects.toThrow(/refusing/);
    expect(fsReads.paths).toEqual([]);
  });

  test("Content-Disposition carries an ASCII name and the UTF-8 one", () => {
    expect(contentDisposition('Fläche "A".png')).toBe(`inline; filename="Fl_che _A_.png"; filename*=UTF-8''Fl%C3%A4che%20%22A%22.png`);
  });
});

const ctx = (params: Record<string, string>) => ({ params: Promise.resolve(params) });

describe("GET /api/v1/uploads/[id]", () => {
  test("serves the photo and its preview to a signed-in user, with safe headers", async () => {
    const bytes = await picture("png", 500, 100);
    const row = await storeUpload(db(), { ...by(), name: "Blatt ö.png", bytes });
    await signInAs(labUser);

    const res = await GET(new Request(`http://localhost:3000/api/v1/uploads/${row.id}`), ctx({ id: row.id }));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/png");
    expect(res.headers.get("content-disposition")).toBe(`inline; filename="Blatt _.png"; filename*=UTF-8''Blatt%20%C3%B6.png`);
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("cache-control")).toBe("private, max-age=3600");
    expect(res.headers.get("content-security-policy")).toBe("default-src 'none'");
    expect(Buffer.compare(Buffer.from(await res.arrayBuffer()), Buffer.from(bytes))).toBe(0);
    // The spy that the refusals below rely on does see the reads.
    expect(fsReads.paths).toEqual([join(DIR, row.storedName)]);

    const thumb = await GET(new Request(`http://localhost:3000/api/v1/uploads/${row.id}?size=thumb`), ctx({ id: row.id }));
    expect(thumb.status).toBe(200);
    expect(thumb.headers.get("content-type")).toBe("image/jpeg");
    expect(thumb.headers.get("content-disposition")).toMatch(/^inline; filename="preview-Blatt _\.jpg"/);
    expect(await sharp(Buffer.from(await thumb.arrayBuffer())).metadata()).toMatchObject({ width: 320, height: 64 });
  });

  test("refuses without a session", async () => {
    const row = (await listUploads(db(), { kind: "item", id: flitch.id }))[0]!;
    await signInAs(null);
    const res = await GET(new Request(`http://localhost:3000/api/v1/uploads/${row.id}`), ctx({ id: row.id }));
    expect(res.status).toBe(401);
    expect(await res.json()).toEqual({ error: expect.any(String) });
    expect(fsReads.paths).toEqual([]);
  });

  test("an unknown id is 404 in JSON", async () => {
    await signInAs(labUser);
    const id = newId();
    const res = await GET(new Request(`http://localhost:3000/api/v1/uploads/${id}`), ctx({ id }));
    expect(res.status).toBe(404);
    expect(await res.json()).toMatchObject({ error: "No such upload." });
    expect(fsReads.paths).toEqual([]);
  });

  test.each(["../../etc/passwd", "..%2F..%2Fetc%2Fpasswd", "..\\..\\evil.png", `${"A".repeat(20)}.png`, `${"A".repeat(19)}/`, "walk-probe"])(
    "a path-like id %j is refused and the disk is never touched",
    async (id) => {
      await signInAs(labUser);
      const res = await GET(new Request(`http://localhost:3000/api/v1/uploads/x`), ctx({ id }));
      expect([400, 404]).toContain(res.status);
      expect(await res.json()).toMatchObject({ error: expect.any(String) });
      expect(fsReads.paths).toEqual([]);
    },
  );

  test("a size other than thumb is refused", async () => {
    await signInAs(labUser);
    const row = (await listUploads(db(), { kind: "item", id: flitch.id }))[0]!;
    const res = await GET(new Request(`http://localhost:3000/api/v1/uploads/${row.id}?size=../../x`), ctx({ id: row.id }));
    expect(res.status).toBe(400);
  });
});

/** A multipart request as a browser would send it. */
function photoRequest(fields: Record<string, string>, files: { name: string; bytes: Uint8Array; type?: string }[], headers?: Record<string, string>) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  for (const f of files) form.append("file", new File([f.bytes as Uint8Array<ArrayBuffer>], f.name, { type: f.type ?? "image/png" }));
  return new Request("http://localhost:3000/api/v1/veneer/photos", { method: "POST", body: form, headers: { origin: "http://localhost:3000", ...headers } });
}

describe("POST /api/v1/veneer/photos", () => {
  test("stores photos of a flitch and answers 201 with what was kept", async () => {
    await signInAs(veneerUser);
    const res = await POST(
      photoRequest({ identity: flitch.identity, caption: "Sap side" }, [
        { name: "a.png", bytes: await picture("png", 40, 30) },
        { name: "b.jpg", bytes: await picture("jpeg", 30, 40), type: "image/jpeg" },
      ]),
      ctx({}),
    );
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(201);
    expect(body.uploads).toEqual([
      { id: expect.stringMatching(/^[A-Za-z0-9_-]{20}$/), name: "a.png", width: 40, height: 30 },
      { id: expect.stringMatching(/^[A-Za-z0-9_-]{20}$/), name: "b.jpg", width: 30, height: 40 },
    ]);
    const row = await uploadById(db(), body.uploads[0].id);
    expect(row).toMatchObject({ subjectKind: "item", subjectId: flitch.id, caption: "Sap side", uploadedBy: veneerUser });
  });

  test("a leaf identity, typed in lower case with a scanner's CR, is accepted", async () => {
    await signInAs(veneerUser);
    const res = await POST(photoRequest({ identity: `${leaf.identity.toLowerCase()}\r` }, [{ name: "leaf.png", bytes: await picture("png") }]), ctx({}));
    expect(res.status).toBe(201);
  });

  test("refuses an item that is neither a flitch nor a leaf, and writes nothing", async () => {
    await signInAs(veneerUser);
    const before = await state();
    const res = await POST(photoRequest({ identity: cabinet.identity }, [{ name: "c.png", bytes: await picture("png") }]), ctx({}));
    expect(res.status).toBe(400);
    expect((await res.json()).error).toBe("CAB-TEST-1 is a cabinet; photos here are for flitches and leaves.");
    expect(await state()).toEqual(before);
  });

  test("refuses an unknown serial with 404", async () => {
    await signInAs(veneerUser);
    const res = await POST(photoRequest({ identity: "F-WAL-26-99999-X" }, [{ name: "c.png", bytes: await picture("png") }]), ctx({}));
    expect(res.status).toBe(404);
    expect((await res.json()).error).toMatch(/No item with the serial F-WAL-26-99999-X/);
  });

  test("one bad file among good ones: 400 naming it, nothing written", async () => {
    await signInAs(veneerUser);
    const before = await state();
    const res = await POST(
      photoRequest({ identity: flitch.identity }, [
        { name: "good.png", bytes: await picture("png") },
        { name: "leaf.jpg", bytes: TEXT, type: "image/jpeg" },
      ]),
      ctx({}),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/^File 2 of 2: leaf\.jpg is not a photo/);
    expect(await state()).toEqual(before);
  });

  test("no file, or no identity, is a clear 400", async () => {
    await signInAs(veneerUser);
    const none = await POST(photoRequest({ identity: flitch.identity }, []), ctx({}));
    expect(none.status).toBe(400);
    expect((await none.json()).error).toBe("Choose at least one photo.");
    const noIdentity = await POST(photoRequest({}, [{ name: "a.png", bytes: await picture("png") }]), ctx({}));
    expect(noIdentity.status).toBe(400);
    expect((await noIdentity.json()).fieldErrors.identity).toBeDefined();
  });

  test("a body declared larger than the limit is refused before it is read", async () => {
    await signInAs(veneerUser);
    const req = new Request("http://localhost:3000/api/v1/veneer/photos", {
      method: "POST",
      headers: { origin: "http://localhost:3000", "content-type": "multipart/form-data; boundary=x", "content-length": String(500 * 1024 * 1024) },
      body: "--x--",
    });
    const res = await POST(req, ctx({}));
    expect(res.status).toBe(413);
    expect(req.bodyUsed).toBe(false);
  });

  test("JSON instead of a form is refused with 415", async () => {
    await signInAs(veneerUser);
    const res = await POST(new Request("http://localhost:3000/api/v1/veneer/photos", { method: "POST", headers: { origin: "http://localhost:3000", "content-type": "application/json" }, body: "{}" }), ctx({}));
    expect(res.status).toBe(415);
  });

  test("a role without veneer.work gets 403, and no session gets 401", async () => {
    const before = await state();
    await signInAs(labUser);
    expect((await POST(photoRequest({ identity: flitch.identity }, [{ name: "a.png", bytes: await picture("png") }]), ctx({}))).status).toBe(403);
    await signInAs(null);
    expect((await POST(photoRequest({ identity: flitch.identity }, [{ name: "a.png", bytes: await picture("png") }]), ctx({}))).status).toBe(401);
    expect(await state()).toEqual(before);
  });
});
