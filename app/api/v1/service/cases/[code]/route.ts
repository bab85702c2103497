import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { readFormCapped } from "@/lib/input/body";
import { addCasePhotos } from "@/lib/service/desk";
import { caseDetailJson } from "@/lib/service/json";
import { CAPTION_MAX, formatSize, MAX_FILES_PER_BATCH, MAX_UPLOAD_BYTES } from "@/lib/uploads";
import { caseByCode } from "@/lib/service/queries";

/** One case with its findings, its history and its owner messages. */
export const GET = guardedRoute("register.read", {}, async ({ params }) => {
  const db = getDb();
  const code = String(params.code ?? "");
  const c = await caseByCode(db, code);
  if (!c) throw new AppError(404, `There is no service case ${code.slice(0, 40)}.`);
  return caseDetailJson(db, c);
});

const MAX_BODY_BYTES = MAX_FILES_PER_BATCH * MAX_UPLOAD_BYTES + 64 * 1024;
const tooLarge = (_limit: number, declared: number | null) =>
  `The upload is ${declared === null ? "too large" : formatSize(declared)}; at most ${MAX_FILES_PER_BATCH} photos of ${formatSize(MAX_UPLOAD_BYTES)} each can be sent at once.`;

/** Photos of what came back (multipart: one or more `file`, optional `caption`); all are checked before any is kept. 201 with what was stored. */
export const POST = guardedRoute("service.work", {}, async ({ req, params, user }) => {
  const db = getDb();
  const code = String(params.code ?? "");
  const c = await caseByCode(db, code);
  if (!c) throw new AppError(404, `There is no service case ${code.slice(0, 40)}.`);
  const form = await readFormCapped(req, MAX_BODY_BYTES, tooLarge);
  const caption = form.get("caption");
  if (typeof caption === "string" && caption.length > CAPTION_MAX) throw new AppError(400, `The caption is at most ${CAPTION_MAX} characters.`, { caption: [`The caption is at most ${CAPTION_MAX} characters.`] });
  const files = form.getAll("file").filter((f): f is File => typeof f !== "string" && f.size > 0);
  if (files.length === 0) throw new AppError(400, "Choose at least one photo.", { file: ["Choose at least one photo."] });
  const rows = await addCasePhotos(db, { code: c.code, files: await Promise.all(files.map(async (f) => ({ name: f.name, bytes: new Uint8Array(await f.arrayBuffer()) }))), caption: typeof caption === "string" ? caption : undefined }, user);
  return Response.json({ uploads: rows.map((r) => ({ id: r.id, name: r.originalName, width: r.width, height: r.height })) }, { status: 201 });
});
