import { describe, expect, test } from "vitest";
import { can, PERMISSIONS, permissionsOf, ROLE_PERMISSIONS, rolesWith, type Permission } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";

// Each station's work belongs to the station's own role and to no one else: a lab user must not
// be able to record a veneer allocation, and the administrator does no station work at all.
const STATION_WORK: [Permission, Role][] = [
  ["veneer.work", "veneer"],
  ["cabinet.work", "cabinet"],
  ["lab.work", "lab"],
  ["assembly.work", "assembly"],
  ["packing.work", "packing"],
  ["service.work", "service"],
  ["quality.work", "quality"],
];

const ADMIN_PERMISSIONS = PERMISSIONS.filter((p) => p.startsWith("admin."));

describe("the permission map's shape", () => {
  test("it has exactly one entry per role, and grants only known permissions, each once", () => {
    expect(Object.keys(ROLE_PERMISSIONS).sort()).toEqual([...ROLES].sort());
    for (const role of ROLES) {
      const granted = ROLE_PERMISSIONS[role];
      for (const p of granted) expect(PERMISSIONS, `${role} → ${p}`).toContain(p);
      expect(new Set(granted).size, role).toBe(granted.length);
    }
  });

  test("every permission is held by at least one role (a permission nobody holds locks its page for everyone)", () => {
    for (const p of PERMISSIONS) expect(rolesWith(p), p).not.toEqual([]);
  });

  test.each([...ROLES])("%s may read the register", (role) => {
    expect(ROLE_PERMISSIONS[role]).toContain("register.read");
  });

  test.each(STATION_WORK)("%s belongs to the %s role alone", (permission, role) => {
    expect(rolesWith(permission)).toEqual([role]);
  });

  test("the table above names every station permission in the map", () => {
    // A new *.work permission must be added to STATION_WORK, so its owner is checked too.
    expect(PERMISSIONS.filter((p) => p.endsWith(".work")).sort()).toEqual(STATION_WORK.map(([p]) => p).sort());
  });

  test("admin holds every admin.* permission, and only admin does", () => {
    expect(ADMIN_PERMISSIONS.length).toBeGreaterThan(0);
    for (const p of ADMIN_PERMISSIONS) expect(rolesWith(p), p).toEqual(["admin"]);
  });

  test("admin does no station work", () => {
    expect(ROLE_PERMISSIONS.admin.filter((p) => p.endsWith(".work"))).toEqual([]);
    expect([...ROLE_PERMISSIONS.admin].sort()).toEqual(["register.read", ...ADMIN_PERMISSIONS].sort());
  });
});

describe("can, rolesWith and permissionsOf agree with the map", () => {
  const pairs = ROLES.flatMap((role) => PERMISSIONS.map((p) => [role, p] as const));

  test.each(pairs)("%s / %s", (role, permission) => {
    const inMap = ROLE_PERMISSIONS[role].includes(permission);
    expect(can([role], permission)).toBe(inMap);
    expect(rolesWith(permission).includes(role)).toBe(inMap);
    expect(permissionsOf([role]).has(permission)).toBe(inMap);
  });

  test("several roles grant the union of their permissions", () => {
    expect(can(["veneer", "lab"], "lab.work")).toBe(true);
    expect(can(["veneer", "lab"], "veneer.work")).toBe(true);
    expect(can(["veneer", "lab"], "admin.users")).toBe(false);
    expect([...permissionsOf(["veneer", "lab"])].sort()).toEqual(["cabinet.lacquer", "lab.work", "labels.print", "register.read", "veneer.work"]);
  });

  test("no roles grant nothing", () => {
    for (const p of PERMISSIONS) expect(can([], p), p).toBe(false);
    expect(permissionsOf([]).size).toBe(0);
  });
});
