import type { Role } from "./roles";

/** Everything a guarded page, action or route may ask for. */
export const PERMISSIONS = [
  "register.read",
  "veneer.work",
  "cabinet.work",
  "lab.work",
  "assembly.work",
  "packing.work",
  "service.work",
  "quality.work",
  "admin.users",
  "admin.reference",
  "admin.mail",
] as const;
export type Permission = (typeof PERMISSIONS)[number];

/** The one permission map: role → what it may do. Every signed-in user may search and read traces. */
export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  veneer: ["register.read", "veneer.work"],
  cabinet: ["register.read", "cabinet.work"],
  lab: ["register.read", "lab.work"],
  assembly: ["register.read", "assembly.work"],
  packing: ["register.read", "packing.work"],
  service: ["register.read", "service.work"],
  quality: ["register.read", "quality.work"],
  admin: ["register.read", "admin.users", "admin.reference", "admin.mail"],
};

export function permissionsOf(roles: readonly Role[]): Set<Permission> {
  const out = new Set<Permission>();
  for (const role of roles) for (const p of ROLE_PERMISSIONS[role]) out.add(p);
  return out;
}

export function can(roles: readonly Role[], permission: Permission): boolean {
  return roles.some((role) => ROLE_PERMISSIONS[role].includes(permission));
}

export function rolesWith(permission: Permission): Role[] {
  return (Object.keys(ROLE_PERMISSIONS) as Role[]).filter((r) => ROLE_PERMISSIONS[r].includes(permission));
}
