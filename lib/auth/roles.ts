/** The roles of the workshop. A user may hold several. */
export const ROLES = ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality", "admin"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  veneer: "Veneer room",
  cabinet: "Cabinet shop",
  lab: "Lab",
  assembly: "Assembly",
  packing: "Packing",
  service: "Service desk",
  quality: "Quality",
  admin: "Administration",
};

export function isRole(value: string): value is Role {
  return (ROLES as readonly string[]).includes(value);
}

/** Roles in the order the workshop's work flows (the order of ROLES), whatever order they came in. */
export function sortRoles(roles: Iterable<Role>): Role[] {
  return [...new Set(roles)].sort((a, b) => ROLES.indexOf(a) - ROLES.indexOf(b));
}
