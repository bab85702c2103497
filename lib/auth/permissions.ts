import type { Role } from "./roles";

/** Everything a guarded page, action or route may ask for. */
export const PERMISSIONS = [
  "register.read",
  "labels.print",
  "certificates.print",
  "cartons.print",
  "veneer.work",
  "cabinet.work",
  "cabinet.lacquer",
  "lab.work",
  "assembly.work",
  "packing.work",
  "service.work",
  "quality.work",
  "admin.users",
  "admin.reference",
  "admin.mail",
  "admin.tokens",
] as const;
export type Permission = (typeof PERMISSIONS)[number];

/** The one permission map: role → what it may do. Every signed-in user may search and read traces. */
export const ROLE_PERMISSIONS: Record<Role, readonly Permission[]> = {
  veneer: ["register.read", "labels.print", "veneer.work", "cabinet.lacquer"],
  cabinet: ["register.read", "labels.print", "cabinet.work", "cabinet.lacquer"],
  lab: ["register.read", "labels.print", "lab.work"],
  assembly: ["register.read", "labels.print", "assembly.work"],
  packing: ["register.read", "labels.print", "certificates.print", "cartons.print", "packing.work"],
  service: ["register.read", "labels.print", "certificates.print", "cartons.print", "service.work"],
  quality: ["register.read", "labels.print", "quality.work"],
  admin: ["register.read", "admin.users", "admin.reference", "admin.mail", "admin.tokens"],
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
