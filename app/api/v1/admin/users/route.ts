import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { listUsers } from "@/lib/users/queries";

/** Every user with roles and status (administrators only). */
export const GET = guardedRoute("admin.users", {}, async () => {
  const users = await listUsers(getDb());
  return { users: users.map((u) => ({ ...u, createdAt: u.createdAt.toISOString() })) };
});
