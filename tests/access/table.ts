/**
 * Who may use what: every server action, route handler and page of Twinleaf, and the roles that
 * may use it, written out by hand from the role table of PRODUCT.md ("Who uses it (roles)"), never
 * computed from lib/auth/permissions.ts. The walks (tests/integration/guard-walk.test.ts for
 * actions and routes, tests/e2e/roles.e2e.test.ts for pages and routes on the built server) call
 * each one as every role, signed out and as a lab test bench, and compare the answer with this
 * table. They fail when app/ holds an action, route or page this table does not list, and when
 * the table lists one that is gone: a person adds each new one here, and decides who may use it.
 *
 * Where PRODUCT.md is silent the row says what was judged and why ("PRODUCT.md is silent: …").
 * Where the code today lets in other roles than PRODUCT.md names, `differs` says what it does; the
 * walks expect that answer (so the suite stays green) and the difference is reported to the lead.
 * Fixing the code then fails the walk until the `differs` line is removed.
 *
 * To add one: an action as "app/…/file.ts#exportName"; a route as "METHOD /api/…/[param]" (the
 * folder names, brackets kept; add `labToken: true` only if lab benches may call it); a page as its
 * URL path ("/admin/…/[param]"). Give `may` and `why`; a page with a parameter also names the
 * `sample` record it opens with (a new kind of sample is added to `Sample` and looked up in the
 * beforeAll of tests/e2e/roles.e2e.test.ts).
 */
import type { Role } from "@/lib/auth/roles";

/** Every role, in the order work flows. PRODUCT.md: "Every signed-in user may search and read traces." */
export const SIGNED_IN: readonly Role[] = ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality", "admin"];

/** Every role that works on the shop floor or at a desk with the things themselves: all but admin. */
export const WORKSHOP: readonly Role[] = ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality"];

export interface Access {
  /** The roles that may use it, or "public": no session needed (and none refused). */
  may: readonly Role[] | "public";
  /** Why: the words of PRODUCT.md's role table, or the judgement where it is silent. */
  why: string;
  /** The code today answers otherwise: the roles it lets in, and what was reported to the lead. */
  differs?: { may: readonly Role[]; note: string };
}

export interface RouteAccess extends Access {
  /** A lab test bench's machine token (`Authorization: Bearer tlm_…`, scope "lab") is let in too. */
  labToken?: true;
  /**
   * Another system's server calls it (signedRoute in lib/auth/guard.ts): no session, no same-origin
   * rule, only a valid signature on the body; without one every caller gets 400 and nothing is written.
   */
  signature?: true;
}

/** A record of the demo workshop a page with a parameter is opened with (looked up by the e2e walk). */
export type Sample =
  | "pair" // a pair that has been built, tested, packed and shipped
  | "flitch" // a flitch whose leaves face a confirmed pair (the pair goes in ?pairs=)
  | "batch" // a batch of drive units
  | "model" // a loudspeaker model
  | "user" // a user account
  | "dealer"
  | "owner"
  | "certificate" // the code of a pair certificate (its public verification link)
  | "case" // the code of a service case
  | "mail" // a message caught by the stand-in SMTP server
  | "token"; // an invitation or reset token (unknown ones show their own message)

export interface PageAccess extends Access {
  /** The record its one parameter names; pages without a parameter have none. */
  sample?: Sample;
  /** A signed-in caller is sent here instead of seeing the page. */
  signedInGoesTo?: string;
}

const READ = "PRODUCT.md: every signed-in user may search and read traces.";
const ADMIN_USERS = "PRODUCT.md, admin: users and roles.";
const ADMIN_REFERENCE = "PRODUCT.md, admin: models (… route), process specs.";
const ADMIN_TOKENS = "PRODUCT.md, admin: machine tokens for test benches.";
const ADMIN_MAIL =
  "PRODUCT.md is silent on caught mail; it holds invitations and reset links, so it belongs with admin's users and roles.";
const VENEER = "PRODUCT.md, veneer: receives flitches, records leaves and defects, plans and confirms leaf allocation to pairs.";
const CABINET = "PRODUCT.md, cabinet: records each route step of a cabinet pair.";
const LACQUER =
  "PRODUCT.md is silent on who makes lacquer cabinets: the veneer room makes every veneered cabinet (confirming runs) and prints cabinet labels, the cabinet shop works them, so both.";
const LAB_UNITS = "PRODUCT.md, lab: uploads drive-unit and crossover measurements, runs and accepts pair matching.";
const LAB_FINAL = "PRODUCT.md, lab: records the finished pair's acoustic test.";
const LAB_BENCH = "PRODUCT.md, admin makes machine tokens for test benches: a lab bench uploads measurements itself.";
const ASSEMBLY = "PRODUCT.md, assembly: builds each speaker of a pair from its cabinet, matched drive units and crossover, by scanning labels.";
const ASSEMBLY_LACQUER = "PRODUCT.md, finish: a lacquer pair's two cabinets are paired later, at assembly.";
const PACKING = "PRODUCT.md, packing: final clean check, prints the pair certificate and carton label, packs, ships to a dealer.";
const SERVICE = "PRODUCT.md, service: opens a service case for a returned serial … ships it back.";
const SERVICE_PARTS = "PRODUCT.md, service: picks a matched replacement and records the repair (reserving stock, fitting it, the case repaired).";
const QUALITY = "PRODUCT.md, quality: dispositions nonconformances, records deviations and corrections.";
const REPARTNER =
  "PRODUCT.md, quality: dispositions nonconformances; a scrapped cabinet's new partner is part of that disposition.";
const PUBLIC_AUTH = "Signing in, a forgotten password and an invitation come before any session.";

/** Server actions, as "file#export". */
export const ACTIONS: Record<string, Access> = {
  "app/(workshop)/service/cases/[code]/replace/actions.ts#reserveAction": { may: ["service"], why: SERVICE_PARTS },
  "app/(workshop)/service/cases/[code]/replace/actions.ts#reserveSetAction": { may: ["service"], why: SERVICE_PARTS },
  "app/(workshop)/service/cases/[code]/replace/actions.ts#releaseAction": { may: ["service"], why: SERVICE_PARTS },
  "app/(workshop)/service/cases/[code]/replace/actions.ts#fitAction": { may: ["service"], why: SERVICE_PARTS },
  "app/(workshop)/service/cases/[code]/replace/actions.ts#markRepairedAction": { may: ["service"], why: SERVICE_PARTS },
  "app/(auth)/sign-in/actions.ts#signInAction": { may: "public", why: PUBLIC_AUTH },
  "app/(auth)/reset/actions.ts#requestResetAction": { may: "public", why: PUBLIC_AUTH },
  "app/(auth)/reset/actions.ts#resetPasswordAction": { may: "public", why: PUBLIC_AUTH },
  "app/(auth)/invite/[token]/actions.ts#acceptInviteAction": { may: "public", why: PUBLIC_AUTH },
  "app/(workshop)/sign-out.ts#signOutAction": { may: "public", why: "Signing out asks for nothing: without a session it has nothing to end." },

  "app/(workshop)/admin/users/actions/invite.ts#inviteAction": { may: ["admin"], why: ADMIN_USERS },
  "app/(workshop)/admin/users/actions/set-roles.ts#setRolesAction": { may: ["admin"], why: ADMIN_USERS },
  "app/(workshop)/admin/users/actions/deactivate.ts#deactivateAction": { may: ["admin"], why: ADMIN_USERS },
  "app/(workshop)/admin/users/actions/reactivate.ts#reactivateAction": { may: ["admin"], why: ADMIN_USERS },
  "app/(workshop)/admin/routes/actions.ts#saveRouteVersionAction": { may: ["admin"], why: ADMIN_REFERENCE },
  "app/(workshop)/admin/tokens/actions.ts#createTokenAction": { may: ["admin"], why: ADMIN_TOKENS },
  "app/(workshop)/admin/tokens/actions.ts#revokeTokenAction": { may: ["admin"], why: ADMIN_TOKENS },

  "app/(workshop)/veneer/actions/receive.ts#receiveFlitchAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/leaves.ts#measureLeafAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/leaves.ts#noteDefectAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/leaves.ts#clearDefectAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/leaves.ts#importLeavesAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/confirm.ts#confirmRunsAction": { may: ["veneer"], why: VENEER },
  "app/(workshop)/veneer/actions/reserves.ts#releaseReserveAction": { may: ["veneer"], why: `${VENEER} Reserve leaves are the veneer room's, kept for repairs.` },
  "app/(workshop)/veneer/actions/reserves.ts#returnReserveAction": { may: ["veneer"], why: `${VENEER} Reserve leaves are the veneer room's, kept for repairs.` },

  "app/(workshop)/cabinet/actions/steps.ts#scanAction": { may: ["cabinet"], why: CABINET },
  "app/(workshop)/cabinet/actions/steps.ts#recordStepAction": { may: ["cabinet"], why: CABINET },
  "app/(workshop)/cabinet/actions/steps.ts#repartnerAction": { may: ["quality"], why: REPARTNER },
  "app/(workshop)/cabinet/lacquer/actions.ts#makeLacquerAction": { may: ["veneer", "cabinet"], why: LACQUER },

  "app/(workshop)/lab/actions/batches.ts#registerBatchAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/actions/batches.ts#measurementAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/actions/batches.ts#failUnitAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/actions/batches.ts#tsCsvAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/actions/batches.ts#acceptPlanAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/crossovers/actions.ts#buildCrossoverAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/crossovers/actions.ts#acceptCrossoverPlanAction": { may: ["lab"], why: LAB_UNITS },
  "app/(workshop)/lab/final-test/actions.ts#finalTestAction": { may: ["lab"], why: LAB_FINAL },
  "app/(workshop)/service/cases/[code]/retest/actions.ts#retestAction": { may: ["service"], why: `${SERVICE} The repaired pair takes its final test again at the desk (issue 13, § 7).` },
  "app/(workshop)/service/cases/[code]/return/actions.ts#sendBackAction": { may: ["service"], why: `${SERVICE} The tested speaker is packed and shipped back to its owner or dealer (issue 13, § 10).` },

  "app/(workshop)/assembly/actions.ts#openPairAction": { may: ["assembly"], why: ASSEMBLY },
  "app/(workshop)/assembly/actions.ts#checkScanAction": { may: ["assembly"], why: ASSEMBLY },
  "app/(workshop)/assembly/actions.ts#buildSpeakersAction": { may: ["assembly"], why: ASSEMBLY },
  "app/(workshop)/assembly/actions.ts#pairLacquerAction": { may: ["assembly"], why: ASSEMBLY_LACQUER },

  "app/(workshop)/packing/actions.ts#packPairAction": { may: ["packing"], why: PACKING },
  "app/(workshop)/packing/actions.ts#moveCartonAction": { may: ["packing"], why: PACKING },
  "app/(workshop)/packing/actions.ts#shipCartonsAction": { may: ["packing"], why: PACKING },
  "app/(workshop)/service/cases/new/actions.ts#openCaseAction": { may: ["service"], why: SERVICE },
  "app/(workshop)/service/cases/[code]/actions.ts#moveCaseAction": { may: ["service"], why: SERVICE },
  "app/(workshop)/service/cases/[code]/actions.ts#recordFindingAction": { may: ["service"], why: SERVICE },

  "app/(workshop)/quality/actions.ts#dispositionAction": { may: ["quality"], why: QUALITY },

  "app/(workshop)/service/cases/[code]/quote/actions.ts#createQuoteAction": { may: ["service"], why: `${SERVICE} An out-of-warranty repair is quoted by the desk.` },
  "app/(workshop)/service/cases/[code]/quote/actions.ts#sendPaymentLinkAction": { may: ["service"], why: `${SERVICE} The desk sends the owner the quote's payment link.` },
};

/** Route handlers, as "METHOD /path" with the folder names of its parameters. */
export const ROUTES: Record<string, RouteAccess> = {
  "GET /api/v1/me": { may: SIGNED_IN, why: READ },
  "GET /api/v1/events": { may: SIGNED_IN, why: READ },
  "GET /api/v1/search": { may: SIGNED_IN, why: READ },
  "GET /api/v1/items/[identity]": { may: SIGNED_IN, why: READ },
  "GET /api/v1/items/[identity]/trace": { may: SIGNED_IN, why: READ },
  "GET /api/v1/items/[identity]/epcis": { may: SIGNED_IN, why: `${READ} PRODUCT.md, outputs: trace exports.` },
  "GET /api/v1/items/[identity]/barcode": { may: SIGNED_IN, why: `${READ} A barcode image prints nothing and records nothing.` },
  "GET /api/v1/uploads/[id]": { may: SIGNED_IN, why: `${READ} Photos of flitches and leaves are part of the record.` },

  "POST /api/v1/labels": {
    may: WORKSHOP,
    why: "PRODUCT.md names veneer (cabinet labels) and packing (carton labels) and is silent on the rest: every station handles labelled things and may need to reprint a worn label; admin does no station work.",
  },
  "POST /api/v1/pairs/[identity]/certificate": {
    may: ["packing", "service"],
    why: "PRODUCT.md, packing: prints the pair certificate; service: reissues the certificate.",
  },
  "GET /api/v1/pairs/[identity]/certificate/prints/[printId]": {
    may: ["packing", "service"],
    why: "The PDF of a print just recorded by the POST above; only its printer opens it, for a few minutes.",
  },
  "POST /api/v1/cartons/[identity]/label": {
    may: ["packing"],
    why: "PRODUCT.md, packing: prints the pair certificate and carton label.",
  },
  "GET /api/v1/cartons/[identity]/label/prints/[printId]": {
    may: ["packing"],
    why: "The PDF of a carton label print just recorded by the POST above; only its printer opens it.",
  },

  "GET /api/v1/service/cases": { may: SIGNED_IN, why: `${READ} The issue of the service desk: reads of cases need register.read.` },
  "POST /api/v1/service/cases": { may: ["service"], why: SERVICE },
  "GET /api/v1/service/cases/[code]": { may: SIGNED_IN, why: `${READ} The issue of the service desk: reads of cases need register.read.` },
  "POST /api/v1/service/cases/[code]": { may: ["service"], why: `${SERVICE} Photos of what came back, through lib/uploads.` },
  "POST /api/v1/veneer/photos": { may: ["veneer"], why: `${VENEER} PRODUCT.md, what it records: flitch … photos.` },

  "GET /api/v1/service/cases/[code]/replacements": { may: SIGNED_IN, why: `${READ} The issue's JSON API: reads of the service desk need register.read.` },
  "GET /api/v1/lab/whoami": { may: ["lab"], labToken: true, why: LAB_BENCH },
  "GET /api/v1/lab/batches/[code]": { may: ["lab"], labToken: true, why: `${LAB_UNITS} ${LAB_BENCH}` },
  "POST /api/v1/lab/responses": { may: ["lab"], labToken: true, why: `${LAB_UNITS} ${LAB_BENCH}` },
  "POST /api/v1/lab/ts-params": { may: ["lab"], labToken: true, why: `${LAB_UNITS} ${LAB_BENCH}` },

  "POST /api/v1/payments/webhook": {
    may: "public",
    signature: true,
    why: "The payment provider's server calls it, with no session and from another origin: it is let in by the signature on its raw body alone (checked with the provider's SDK), never by a role.",
  },
  "GET /api/v1/payments/done": {
    may: "public",
    why: "Where an owner, who has no account, lands after the payment page: a word of thanks; it reads and writes nothing.",
  },

  "GET /api/v1/admin/users": { may: ["admin"], why: ADMIN_USERS },
  "GET /api/v1/admin/mail/[id]/attachments/[index]": { may: ["admin"], why: ADMIN_MAIL },
};

/** Pages, by URL path with the folder names of their parameters. */
export const PAGES: Record<string, PageAccess> = {
  "/sign-in": { may: "public", why: PUBLIC_AUTH, signedInGoesTo: "/" },
  "/reset": { may: "public", why: PUBLIC_AUTH },
  "/reset/[token]": { may: "public", why: PUBLIC_AUTH, sample: "token" },
  "/invite/[token]": { may: "public", why: PUBLIC_AUTH, sample: "token" },
  "/verify/[code]": { may: "public", why: "PRODUCT.md: anyone with the certificate's QR code can open a public verification page.", sample: "certificate" },

  "/": { may: SIGNED_IN, why: `${READ} Today shows each person the work of their own roles.` },

  "/register": { may: SIGNED_IN, why: READ },
  "/register/items/[identity]": { may: SIGNED_IN, why: READ, sample: "pair" },
  "/register/dealers/[code]": { may: SIGNED_IN, why: `${READ} PRODUCT.md, what it computes: search over serials, flitches, dealers and owners.`, sample: "dealer" },
  "/register/owners/[id]": { may: SIGNED_IN, why: `${READ} PRODUCT.md, what it computes: search over serials, flitches, dealers and owners.`, sample: "owner" },

  "/veneer": { may: ["veneer"], why: VENEER },
  "/veneer/receive": { may: ["veneer"], why: VENEER },
  "/veneer/flitches/[identity]": { may: ["veneer"], why: VENEER, sample: "flitch" },
  "/veneer/flitches/[identity]/confirmed": { may: ["veneer"], why: VENEER, sample: "flitch" },

  "/cabinet": { may: ["cabinet"], why: CABINET },
  "/cabinet/lacquer": { may: ["veneer", "cabinet"], why: LACQUER },
  "/cabinet/pairs/[identity]": {
    may: SIGNED_IN,
    why: `${READ} A pair's route is read by all; only the cabinet shop gets the step form and quality its disposition.`,
    sample: "pair",
  },

  "/lab": { may: ["lab"], why: LAB_UNITS },
  "/lab/batches/new": { may: ["lab"], why: LAB_UNITS },
  "/lab/batches/[code]": { may: ["lab"], why: LAB_UNITS, sample: "batch" },
  "/lab/match": { may: ["lab"], why: LAB_UNITS },
  "/lab/crossovers": { may: ["lab"], why: LAB_UNITS },
  "/lab/final-test": { may: ["lab"], why: LAB_FINAL },

  "/assembly": { may: ["assembly"], why: ASSEMBLY },
  "/assembly/[pair]": { may: ["assembly"], why: ASSEMBLY, sample: "pair" },

  "/packing": { may: ["packing"], why: PACKING },
  "/packing/pack/[pair]": { may: ["packing"], why: PACKING, sample: "pair" },

  "/service": { may: ["service"], why: SERVICE },
  "/service/cases/[code]/retest": { may: ["service"], why: `${SERVICE} The repaired pair takes its final test again at the desk.`, sample: "case" },
  "/service/cases/[code]/return": { may: ["service"], why: `${SERVICE} The tested speaker is packed and shipped back to its owner or dealer.`, sample: "case" },
  "/service/cases/new": { may: ["service"], why: SERVICE },
  "/service/cases/[code]": { may: ["service"], why: `${SERVICE} The case page holds the desk's forms, so it stays in the service area.`, sample: "case" },
  "/service/cases/[code]/replace": { may: ["service"], why: SERVICE_PARTS, sample: "case" },
  "/quality": { may: ["quality"], why: QUALITY },

  "/admin": { may: ["admin"], why: "PRODUCT.md, admin: users and roles, models, … machine tokens." },
  "/admin/users": { may: ["admin"], why: ADMIN_USERS },
  "/admin/users/[id]": { may: ["admin"], why: ADMIN_USERS, sample: "user" },
  "/admin/routes": { may: ["admin"], why: ADMIN_REFERENCE },
  "/admin/routes/[model]/edit": { may: ["admin"], why: ADMIN_REFERENCE, sample: "model" },
  "/admin/tokens": { may: ["admin"], why: ADMIN_TOKENS },
  "/admin/mail": { may: ["admin"], why: ADMIN_MAIL },
  "/admin/mail/[id]": { may: ["admin"], why: ADMIN_MAIL, sample: "mail" },
  "/admin/audit": { may: ["admin"], why: "PRODUCT.md is silent on who checks the audit trail; an administrator keeps the system and its records (21 CFR Part 11 §11.10(e), EU GMP Annex 11 §9 expect the trail reviewable)." },
  "/service/cases/[code]/quote": { may: ["service"], why: `${SERVICE} Quoting and charging an out-of-warranty repair is the desk's work.`, sample: "case" },
};

/** The roles the code is expected to let in today: `differs` where it differs, else `may`. */
export function expectedToday(row: Access): readonly Role[] | "public" {
  return row.differs?.may ?? row.may;
}

/** Whether a signed-in role gets past the guard of a row today. */
export function lets(row: Access, role: Role): boolean {
  const may = expectedToday(row);
  return may === "public" || may.includes(role);
}
