import { guardedRoute } from "@/lib/auth/guard";

/** Who am I: the signed-in user, their roles and permissions. */
export const GET = guardedRoute("register.read", {}, async ({ user }) => ({
  id: user.id,
  email: user.email,
  name: user.name,
  roles: user.roles,
  permissions: [...user.permissions].sort(),
}));
