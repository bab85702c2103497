"use server";
import { getDb } from "@/db";
import { clientAddress, publicAction, signInAs } from "@/lib/auth/guard";
import { signIn } from "@/lib/auth/sign-in";
import { safeNext, signInSchema } from "../schemas";

export const signInAction = publicAction(signInSchema, async (input) => {
  const db = getDb();
  const result = await signIn(db, { email: input.email, password: input.password, address: await clientAddress() });
  if (!result.ok) return { ok: false, status: result.reason === "throttled" ? 429 : 401, message: result.message, values: { email: input.email } };
  await signInAs(result.userId);
  return { ok: true, redirectTo: safeNext(input.next) };
});
