import { guardedRoute } from "@/lib/auth/guard";

/** For a bench to check its token (or a lab user their session): who Twinleaf takes the caller for. */
export const GET = guardedRoute("lab.work", { machine: "lab" }, async ({ user, machine }) => {
  if (machine) return { kind: "machine", name: machine.name, scope: machine.scope };
  return { kind: "user", name: user.name };
});
