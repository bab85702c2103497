/**
 * The invented demo workshop as plain data. Every model, dealer, town and person here is fictional;
 * only the wood species are real, because they are trade terms.
 */
import { ROLES, type Role } from "@/lib/auth/roles";
import type { dealers, finishes, models } from "@/db/schema";

export const DEMO_PASSWORD = "twinleaf-demo";

import type { PartType } from "@/lib/vocabulary/part-types";

export interface SeedModel extends Omit<typeof models.$inferInsert, "id" | "active"> {
  positions: { position: string; partType: PartType; count: number }[];
  /** Largest band difference allowed between the left and right unit of one part type, in dB. */
  tolerances: { partType: PartType; mismatchLimitDb: number }[];
  /** Metal trim parts a speaker takes, bought in and finished on the trim route (invented). */
  trim?: { position: string; label: string; count: number }[];
}

export type SeedFinish = Omit<typeof finishes.$inferInsert, "id" | "active">;
export type SeedDealer = Omit<typeof dealers.$inferInsert, "id" | "active">;

export interface SeedUser {
  email: string;
  name: string;
  roles: Role[];
}

/*
 * Leaf sizes follow the veneered side panel plus about 10–15 mm of overhang on every edge for
 * trimming: a face of height H and depth D taking k leaves side by side needs leaves of at least
 * H + 2·overhang long and D / k + overhang wide.
 *
 * Drive-unit limits: left/right within ±0.5 dB over the passband is common practice (no standard
 * sets it). Bass units get a little more room because below the transition the room dominates.
 *
 * GTIN-14s: indicator 1 + the 952 prefix GS1 keeps for demonstrations and examples, so they can
 * never collide with a real product; the last digit is the GS1 mod-10 check digit.
 */
export const SEED_MODELS: SeedModel[] = [
  {
    code: "PW2",
    // The workshop's own choice for the stand-mount: one year (demo).
    warrantyMonths: 12,
    name: "Pennywort 2",
    // Two-way stand-mount, cabinet 380 × 230 × 300 mm: two leaves per side panel.
    leavesPerFace: 2,
    minLeafLengthMm: 410,
    minLeafWidthMm: 165,
    pairResponseLimitDb: 1.0,
    responseMinHz: 200,
    responseMaxHz: 10000,
    pairGtin: "19527730001001",
    positions: [
      { position: "T", partType: "tweeter", count: 1 },
      { position: "B", partType: "bass", count: 1 },
    ],
    tolerances: [
      { partType: "tweeter", mismatchLimitDb: 0.5 },
      { partType: "bass", mismatchLimitDb: 0.75 },
    ],
  },
  {
    code: "SL3",
    // The workshop's own choice for the studio three-way: three years (demo).
    warrantyMonths: 36,
    name: "Sallow Studio",
    // Three-way stand-mount, cabinet 500 × 260 × 360 mm: three leaves per side panel.
    leavesPerFace: 3,
    minLeafLengthMm: 530,
    minLeafWidthMm: 135,
    pairResponseLimitDb: 1.0,
    responseMinHz: 150,
    responseMaxHz: 10000,
    pairGtin: "19527730002008",
    positions: [
      { position: "T", partType: "tweeter", count: 1 },
      { position: "M", partType: "midrange", count: 1 },
      { position: "B", partType: "bass", count: 1 },
    ],
    tolerances: [
      { partType: "tweeter", mismatchLimitDb: 0.5 },
      { partType: "midrange", mismatchLimitDb: 0.5 },
      { partType: "bass", mismatchLimitDb: 0.75 },
    ],
  },
  {
    code: "TB3",
    // The workshop's own choice for the tower: five years (demo).
    warrantyMonths: 60,
    name: "Thornbeam Tower",
    // Three-way floor-stander, cabinet 1050 × 240 × 400 mm, two bass units: four leaves per side panel.
    leavesPerFace: 4,
    minLeafLengthMm: 1080,
    minLeafWidthMm: 115,
    pairResponseLimitDb: 1.0,
    responseMinHz: 100,
    responseMaxHz: 12500,
    pairGtin: "19527730003005",
    positions: [
      { position: "T", partType: "tweeter", count: 1 },
      { position: "M", partType: "midrange", count: 1 },
      { position: "B1", partType: "bass", count: 1 },
      { position: "B2", partType: "bass", count: 1 },
    ],
    tolerances: [
      { partType: "tweeter", mismatchLimitDb: 0.5 },
      { partType: "midrange", mismatchLimitDb: 0.5 },
      { partType: "bass", mismatchLimitDb: 0.75 },
    ],
    // The tower stands on a painted metal plinth and carries a machined top housing (invented).
    trim: [
      { position: "TOP", label: "Top housing", count: 1 },
      { position: "PLN", label: "Plinth", count: 1 },
    ],
  },
];

export const SEED_FINISHES: SeedFinish[] = [
  { code: "WAL", name: "Black walnut", kind: "veneer", botanicalName: "Juglans nigra", cut: "crown", detail: "" },
  { code: "OAK", name: "European oak", kind: "veneer", botanicalName: "Quercus robur", cut: "quarter", detail: "" },
  { code: "CHY", name: "American cherry", kind: "veneer", botanicalName: "Prunus serotina", cut: "crown", detail: "" },
  { code: "SYC", name: "Ripple sycamore", kind: "veneer", botanicalName: "Acer pseudoplatanus", cut: "", detail: "figured" },
  // Invented colour names; an sRGB reference for the sample board, and the sheen in words.
  { code: "LSL", name: "Estuary Slate", kind: "lacquer", colourRef: "#3E4A52", detail: "satin" },
  { code: "LCH", name: "Chalk Meadow", kind: "lacquer", colourRef: "#ECE8DD", detail: "high gloss" },
];

// Invented shops in invented towns.
export const SEED_DEALERS: SeedDealer[] = [
  { code: "MLR", name: "Merrow Lane Listening Rooms", address: "Unit 4, Tanyard Court\n18 Merrow Lane", postcode: "MR7 2QT", city: "Merrowby", country: "GB", email: "orders@merrowlane.test" },
  { code: "SNV", name: "Atelier Sonvelle", address: "12 rue des Tisserands", postcode: "41290", city: "Vaudrey-sur-Lenne", country: "FR", email: "commandes@sonvelle.test" },
  { code: "KHS", name: "Klangkontor Haselstedt", address: "Mühlengasse 7", postcode: "37415", city: "Haselstedt", country: "DE", email: "bestellung@klangkontor-haselstedt.test" },
  { code: "BLS", name: "Brattvik Lydstue", address: "Sjøgata 21", postcode: "6893", city: "Brattvik", country: "NO", email: "ordre@brattvik-lydstue.test" },
];

const DEMO_PEOPLE: Record<Role, string> = {
  veneer: "Maren Holtby",
  cabinet: "Tobias Ferrand-Lund",
  lab: "Priya Castellane",
  assembly: "Jonah Okafor-Reyes",
  packing: "Lotte Brennagh",
  service: "Samir Delacourt",
  quality: "Agnes Tarrowby",
  admin: "Ruth Ellingham",
};

/** One demo user per role, holding that single role, so each station can be tried on its own. */
export const SEED_USERS: SeedUser[] = ROLES.map((role) => ({
  email: `${role}@demo.twinleaf.test`,
  name: DEMO_PEOPLE[role],
  roles: [role],
}));
