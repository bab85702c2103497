/**
 * Where each page lives. The first segment of a workshop URL is the area's word, which is also its
 * folder under app/(workshop)/, its key in lib/areas.ts and the first word of its permission
 * ("cabinet" → /cabinet, cabinet.work). Pages link through these helpers, never a hand-built string.
 */
const seg = (s: string) => encodeURIComponent(s);

export const paths = {
  today: "/",
  register: "/register",
  item: (identity: string) => `/register/items/${seg(identity)}`,
  dealer: (code: string) => `/register/dealers/${seg(code)}`,
  owner: (id: string) => `/register/owners/${seg(id)}`,

  veneer: "/veneer",
  veneerReceive: "/veneer/receive",
  flitch: (identity: string) => `/veneer/flitches/${seg(identity)}`,
  flitchConfirmed: (identity: string, pairs: string) => `/veneer/flitches/${seg(identity)}/confirmed?pairs=${seg(pairs)}`,

  cabinet: "/cabinet",
  cabinetPair: (identity: string, station?: string) => `/cabinet/pairs/${seg(identity)}${station ? `?station=${seg(station)}` : ""}`,
  lacquer: "/cabinet/lacquer",

  lab: "/lab",
  labBatch: (code: string) => `/lab/batches/${seg(code)}`,
  labNewBatch: "/lab/batches/new",
  labMatch: "/lab/match",
  labCrossovers: "/lab/crossovers",
  labFinalTest: "/lab/final-test",

  assembly: "/assembly",
  assemblyPair: (identity: string) => `/assembly/${seg(identity)}`,

  packing: "/packing",
  pack: (identity: string) => `/packing/pack/${seg(identity)}`,

  service: "/service",
  quality: "/quality",

  admin: "/admin",
  adminAudit: "/admin/audit",
  adminMail: "/admin/mail",
  adminRoutes: "/admin/routes",
  adminTokens: "/admin/tokens",
  adminUsers: "/admin/users",
} as const;

/** An item's page in the register. */
export const itemHref = paths.item;
