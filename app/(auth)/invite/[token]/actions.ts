"use server";
import { getDb } from "@/db";
import { publicAction, signInAs } from "@/lib/auth/guard";
import { acceptInvite } from "@/lib/users/queries";
import { newPasswordSchema } from "../../schemas";

export const acceptInviteAction = publicAction(newPasswordSchema, async (input) => {
  const db = getDb();
  const { userId } = await acceptInvite(db, { token: input.token, password: input.password });
  await signInAs(userId);
  return { ok: true, redirectTo: "/" };
});
