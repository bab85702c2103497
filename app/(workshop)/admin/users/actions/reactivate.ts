"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { reactivateUser } from "@/lib/users/queries";
import { userIdSchema } from "../schemas";

export const reactivateAction = guardedAction("admin.users", userIdSchema, async (input, user) => {
  await reactivateUser(getDb(), { userId: input.userId, actor: { id: user.id, name: user.name } });
  return { ok: true, message: "Reactivated. The person can sign in again.", revalidate: ["/admin/users", `/admin/users/${input.userId}`] };
});
