/**
 * The permission map, stated literally: each role's line written by hand from PRODUCT.md's role
 * table ("Who uses it (roles)"), with the reason beside it. A changed line in lib/auth/permissions.ts
 * fails here until a person changes this table too. What each permission opens (which actions,
 * routes and pages) is in tests/fixtures/access/table.ts and walked by guard-walk and roles.e2e.
 */
import { describe, expect, test } from "vitest";
import { can, PERMISSIONS, permissionsOf, ROLE_PERMISSIONS, rolesWith, type Permission } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";

const EXPECTED_PERMISSIONS = [
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
];

// register.read: PRODUCT.md, "Every signed-in user may search and read traces", so every role.
// labels.print: PRODUCT.md names veneer (cabinet labels) and packing (certificate, carton label),
//   and service reissues the certificate; it is silent on the other stations, which handle
//   labelled things and may reprint a worn label. Admin does no station work.
// certificates.print: PRODUCT.md, packing "prints the pair certificate", service "reissues the
//   certificate"; nobody else.
// cartons.print: PRODUCT.md, packing "prints the ... carton label"; service "ships it back", and the
//   service desk's issue packs a repaired speaker "carton label as usual"; nobody else.
// cabinet.lacquer: PRODUCT.md is silent on who makes lacquer cabinets; the veneer room makes every
//   veneered cabinet and prints cabinet labels, and the cabinet shop works them, so both.
const EXPECTED_MAP: Record<Role, string[]> = {
  veneer: ["register.read", "labels.print", "veneer.work", "cabinet.lacquer"], // receives flitches, leaves, defects, allocation; prints cabinet labels
  cabinet: ["register.read", "labels.print", "cabinet.work", "cabinet.lacquer"], // records each route step of a cabinet pair
  lab: ["register.read", "labels.print", "lab.work"], // measurements, pair matching, the finished pair's acoustic test
  assembly: ["register.read", "labels.print", "assembly.work"], // builds each speaker by scanning labels
  packing: ["register.read", "labels.print", "certificates.print", "cartons.print", "packing.work"], // clean check, certificate and carton label, packs, ships
  service: ["register.read", "labels.print", "certificates.print", "cartons.print", "service.work"], // service cases, reissues the certificate
  quality: ["register.read", "labels.print", "quality.work"], // containments, holds, dispositions, deviations, corrections
  admin: ["register.read", "admin.users", "admin.reference", "admin.mail", "admin.tokens"], // users and roles, models, routes, tokens; no station work
};

describe("the permission map", () => {
  test("names exactly these permissions", () => {
    expect([...PERMISSIONS]).toEqual(EXPECTED_PERMISSIONS);
  });

  test("has exactly one line per role", () => {
    expect(Object.keys(ROLE_PERMISSIONS).sort()).toEqual([...ROLES].sort());
    expect(Object.keys(EXPECTED_MAP).sort()).toEqual([...ROLES].sort());
  });

  test.each(Object.entries(EXPECTED_MAP))("%s holds exactly %j", (role, permissions) => {
    expect([...ROLE_PERMISSIONS[role as Role]].sort()).toEqual([...permissions].sort());
    expect(new Set(ROLE_PERMISSIONS[role as Role]).size, "each permission once").toBe(ROLE_PERMISSIONS[role as Role].length);
  });
});

// Which roles hold each permission, read off the literal map above by hand: a second statement
// of the same table, so that a helper that reads the map wrongly is caught as well.
const HOLDERS: [string, Role[]][] = [
  ["register.read", ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality", "admin"]],
  ["labels.print", ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality"]],
  ["certificates.print", ["packing", "service"]],
  ["cartons.print", ["packing", "service"]],
  ["veneer.work", ["veneer"]],
  ["cabinet.work", ["cabinet"]],
  ["cabinet.lacquer", ["veneer", "cabinet"]],
  ["lab.work", ["lab"]],
  ["assembly.work", ["assembly"]],
  ["packing.work", ["packing"]],
  ["service.work", ["service"]],
  ["quality.work", ["quality"]],
  ["admin.users", ["admin"]],
  ["admin.reference", ["admin"]],
  ["admin.mail", ["admin"]],
  ["admin.tokens", ["admin"]],
];

describe("can, rolesWith and permissionsOf", () => {
  test("the holders table names every permission once", () => {
    expect(HOLDERS.map(([p]) => p)).toEqual(EXPECTED_PERMISSIONS);
  });

  test.each(HOLDERS)("%s is held by %j", (permission, holders) => {
    const p = permission as Permission;
    expect(rolesWith(p)).toEqual(holders);
    for (const role of ROLES) {
      expect(can([role], p), role).toBe(holders.includes(role));
      expect(permissionsOf([role]).has(p), role).toBe(holders.includes(role));
    }
  });

  test.each([
    // [roles, a permission, held?] — several roles grant the union of their permissions.
    [["veneer", "lab"], "lab.work", true],
    [["veneer", "lab"], "veneer.work", true],
    [["veneer", "lab"], "admin.users", false],
    [["admin", "packing"], "packing.work", true],
    [["admin", "packing"], "labels.print", true],
    [["cabinet", "quality"], "assembly.work", false],
    [[], "register.read", false],
  ] as [Role[], Permission, boolean][])("can(%j, %s) is %s", (roles, permission, held) => {
    expect(can(roles, permission)).toBe(held);
    expect(permissionsOf(roles).has(permission)).toBe(held);
  });

  test.each([
    [["veneer", "lab"], ["cabinet.lacquer", "lab.work", "labels.print", "register.read", "veneer.work"]],
    [["admin", "packing"], ["admin.mail", "admin.reference", "admin.tokens", "admin.users", "cartons.print", "certificates.print", "labels.print", "packing.work", "register.read"]],
    [[], []],
  ] as [Role[], string[]][])("permissionsOf(%j) is %j", (roles, permissions) => {
    expect([...permissionsOf(roles)].sort()).toEqual(permissions);
  });
});
