import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute } from "@/lib/auth/guard";
import { caseDetailJson } from "@/lib/service/json";
import { caseByCode } from "@/lib/service/queries";

/** One case with its findings, its history and its owner messages. */
export const GET = guardedRoute("register.read", {}, async ({ params }) => {
  const db = getDb();
  const code = String(params.code ?? "");
  const c = await caseByCode(db, code);
  if (!c) throw new AppError(404, `There is no service case ${code.slice(0, 40)}.`);
  return caseDetailJson(db, c);
});
