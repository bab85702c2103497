import type { Permission } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";
import type { Station } from "@/lib/vocabulary/stations";

export interface Area {
  key: string;
  href: string;
  label: string;
  permission: Permission;
  /** Stations whose events belong to this area. */
  stations: string[];
  summary: string;
  /** The usual cautions for the work done here (see SAFETY_DEFERRAL). */
  cautions: string[];
}

/** Shown under every list of cautions: Twinleaf records work, it does not make it safe. */
export const SAFETY_DEFERRAL =
  "These are reminders, not a safety system. Your site's safety rules, local regulations and qualified people come first. Twinleaf records the work; it does not certify anything as safe.";

const LIFT = "Cabinets and packed pairs are heavy: lift with two people or a lifting aid, and keep walkways clear.";

/** The areas of work, in the order the navigation shows them. */
export const AREAS: Area[] = [
  {
    key: "register",
    href: "/register",
    label: "Register",
    permission: "register.read",
    stations: [],
    summary: "Every pair and part the workshop has built, with its trace, and the models, finishes and dealers they belong to.",
    cautions: [],
  },
  {
    key: "veneer",
    href: "/veneer",
    label: "Veneer room",
    permission: "veneer.work",
    stations: ["veneer"],
    summary: "Receive flitches, record leaves and their defects, plan and confirm bookmatched leaf allocation, print cabinet labels.",
    cautions: [
      "Veneer edges and knives cut: handle leaves with care and keep blades guarded.",
      "Sanding and cutting raise fine wood dust: run the dust extraction and wear the respirator your site specifies.",
      "Flitch bundles are heavy and awkward: lift with help.",
    ],
  },
  {
    key: "cabinet",
    href: "/cabinet",
    label: "Cabinet shop",
    permission: "cabinet.work",
    stations: ["press", "trim", "brace", "sanding", "inspection", "lacquer", "oven", "flatting", "cure", "polish", "finish", "cabinet"],
    summary: "Record each step of a cabinet pair's route: press cycle, trimming, bracing, sanding, lacquer coats, flatting, curing and polishing.",
    cautions: [
      "The forming press is hot and closes with great force: mind burns and pinch points, and keep hands clear of the platens.",
      "Solvent lacquers: spray only in the booth with its ventilation running, wear the respirator and gloves your site specifies, and keep ignition sources away.",
      "Sanding and polishing raise fine dust: run the extraction and wear eye and breathing protection.",
      LIFT,
    ],
  },
  {
    key: "lab",
    href: "/lab",
    label: "Lab",
    permission: "lab.work",
    stations: ["lab", "lab-bench"],
    summary: "Measure drive units and crossovers, match left and right, and test each finished pair.",
    cautions: [
      "Soldering gives off fumes: use the fume extraction and let joints cool before handling.",
      "Test signals can be loud: protect your hearing when measuring at high levels.",
    ],
  },
  {
    key: "assembly",
    href: "/assembly",
    label: "Assembly",
    permission: "assembly.work",
    stations: ["assembly"],
    summary: "Build each speaker of a pair from its cabinet, matched drive units and crossover, by scanning their labels.",
    cautions: ["Soldering gives off fumes: use the fume extraction.", LIFT],
  },
  {
    key: "packing",
    href: "/packing",
    label: "Packing",
    permission: "packing.work",
    stations: ["packing"],
    summary: "Final clean check, the pair certificate and carton labels, packing and shipping to dealers.",
    cautions: [LIFT, "Strapping and cutters: cut away from the body and wear eye protection."],
  },
  {
    key: "service",
    href: "/service",
    label: "Service desk",
    permission: "service.work",
    stations: ["service"],
    summary: "Open a case for a returned serial, trace it, pick a matched replacement, record the repair and write to the owner.",
    cautions: ["Soldering gives off fumes: use the fume extraction.", LIFT],
  },
  {
    key: "quality",
    href: "/quality",
    label: "Quality",
    permission: "quality.work",
    stations: ["quality"],
    summary: "Raise and close containments on suspect lots, disposition nonconformances, record deviations and corrections.",
    cautions: [],
  },
  {
    key: "admin",
    href: "/admin",
    label: "Administration",
    permission: "admin.users",
    stations: ["admin", "seed", "sign-in"],
    summary: "Users and roles, the workshop's reference data, and the mail Twinleaf sends.",
    cautions: [],
  },
];

/**
 * Where a person's records are made when the page does not belong to one station (a label or a
 * certificate printed from the register): the area of their first role in the order work flows.
 * Taken from the session, never from the request.
 */
export function homeStation(roles: readonly Role[]): Station {
  return ROLES.find((r) => roles.includes(r)) ?? "admin";
}

export function areaByKey(key: string): Area {
  const area = AREAS.find((a) => a.key === key);
  if (!area) throw new Error(`unknown area ${key}`);
  return area;
}
