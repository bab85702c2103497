"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { setRoles } from "@/lib/users/queries";
import { setRolesSchema } from "../schemas";

export const setRolesAction = guardedAction("admin.users", setRolesSchema, async (input, user) => {
  await setRoles(getDb(), { ...input, actor: { id: user.id, name: user.name } });
  return { ok: true, message: "Roles saved. They apply from the person's next click.", revalidate: ["/admin/users", `/admin/users/${input.userId}`] };
});
