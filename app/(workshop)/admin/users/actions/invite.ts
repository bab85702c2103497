"use server";
import { getDb } from "@/db";
import { appBaseUrl, guardedAction } from "@/lib/auth/guard";
import { inviteUser } from "@/lib/users/queries";
import { inviteSchema } from "../schemas";

export const inviteAction = guardedAction("admin.users", inviteSchema, async (input, user) => {
  await inviteUser(getDb(), { ...input, actor: { id: user.id, name: user.name }, baseUrl: await appBaseUrl() });
  return { ok: true, message: `Invitation sent to ${input.email}.`, revalidate: ["/admin/users"] };
});
