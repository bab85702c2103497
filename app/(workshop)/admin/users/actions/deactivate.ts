"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { deactivateUser } from "@/lib/users/queries";
import { userIdSchema } from "../schemas";

export const deactivateAction = guardedAction("admin.users", userIdSchema, async (input, user) => {
  await deactivateUser(getDb(), { ...input, actor: { id: user.id, name: user.name } });
  return { ok: true, message: "Deactivated. Every session of this account has ended.", revalidate: ["/admin/users", `/admin/users/${input.userId}`] };
});
