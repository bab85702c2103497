"use server";
import { getDb } from "@/db";
import { publicAction, setSessionCookie } from "@/lib/auth/guard";
import { startSession } from "@/lib/auth/sessions";
import { acceptInvite } from "@/lib/users/queries";
import { newPasswordSchema } from "../../schemas";

export const acceptInviteAction = publicAction(newPasswordSchema, async (input) => {
  const db = getDb();
  const { userId } = await acceptInvite(db, { token: input.token, password: input.password });
  const { cookie } = await startSession(userId, db);
  await setSessionCookie(cookie);
  return { ok: true, redirectTo: "/" };
});
