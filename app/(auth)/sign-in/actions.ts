"use server";
import { getDb } from "@/db";
import { clientAddress, publicAction, setSessionCookie } from "@/lib/auth/guard";
import { signIn } from "@/lib/auth/sign-in";
import { startSession } from "@/lib/auth/sessions";
import { safeNext, signInSchema } from "../schemas";

export const signInAction = publicAction(signInSchema, async (input) => {
  const db = getDb();
  const result = await signIn(db, { email: input.email, password: input.password, address: await clientAddress() });
  if (!result.ok) return { ok: false, status: result.reason === "throttled" ? 429 : 401, message: result.message, values: { email: input.email } };
  const { cookie } = await startSession(result.userId, db);
  await setSessionCookie(cookie);
  return { ok: true, redirectTo: safeNext(input.next) };
});
