"use server";
import { getDb } from "@/db";
import { appBaseUrl, clientAddress, publicAction, signInAs } from "@/lib/auth/guard";
import { requestPasswordReset, resetPassword } from "@/lib/users/queries";
import { newPasswordSchema, resetRequestSchema } from "../schemas";

/** Answers the same whether or not the address has an account. */
export const requestResetAction = publicAction(resetRequestSchema, async (input) => {
  await requestPasswordReset(getDb(), { email: input.email, baseUrl: await appBaseUrl(), address: await clientAddress() });
  return { ok: true, message: "If that address belongs to an account, a link to set a new password is on its way. It works once, for one hour." };
});

export const resetPasswordAction = publicAction(newPasswordSchema, async (input) => {
  const db = getDb();
  const { userId } = await resetPassword(db, { token: input.token, password: input.password });
  await signInAs(userId);
  return { ok: true, redirectTo: "/" };
});
