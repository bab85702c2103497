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
  dealers: "/register/dealers",
  dealer: (code: string) => `/register/dealers/${seg(code)}`,
  owner: (id: string) => `/register/owners/${seg(id)}`,

  veneer: "/veneer",
  veneerReceive: "/veneer/receive",
  flitch: (identity: string) => `/veneer/flitches/${seg(identity)}`,
  flitchConfirmed: (identity: string, pairs: string) => `/veneer/flitches/${seg(identity)}/confirmed?pairs=${seg(pairs)}`,

  cabinet: "/cabinet",
  cabinetPair: (identity: string, station?: string) => `/cabinet/pairs/${seg(identity)}${station ? `?station=${seg(station)}` : ""}`,
  lacquer: "/cabinet/lacquer",
  /** Goods-in of metal trim parts; their route opens at cabinetPair like any routed item. */
  trimParts: "/cabinet/trim",

  lab: "/lab",
  labBatches: "/lab/batches",
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
  serviceIntake: "/service/cases/new",
  serviceCase: (code: string) => `/service/cases/${seg(code)}`,
  serviceReplace: (code: string, side: string, position: string) => `/service/cases/${seg(code)}/replace?side=${seg(side)}&position=${seg(position)}`,
  serviceRetest: (code: string) => `/service/cases/${seg(code)}/retest`,
  serviceQuote: (code: string) => `/service/cases/${seg(code)}/quote`,
  serviceReturn: (code: string) => `/service/cases/${seg(code)}/return`,
  quality: "/quality",
  containments: "/quality/containments",
  containment: (code: string) => `/quality/containments/${seg(code)}`,
  containmentCsv: (code: string, dealer?: string) => `/api/v1/containments/${seg(code)}/affected.csv${dealer ? `?dealer=${seg(dealer)}` : ""}`,
  containmentEpcis: (code: string, dealer?: string) => `/api/v1/containments/${seg(code)}/epcis${dealer ? `?dealer=${seg(dealer)}` : ""}`,

  admin: "/admin",
  adminAudit: "/admin/audit",
  adminModels: "/admin/models",
  adminNewModel: "/admin/models/new",
  adminModel: (code: string) => `/admin/models/${seg(code)}`,
  adminFinishes: "/admin/finishes",
  adminDealers: "/admin/dealers",
  adminOwners: "/admin/owners",
  adminMail: "/admin/mail",
  adminRoutes: "/admin/routes",
  adminTokens: "/admin/tokens",
  adminUsers: "/admin/users",
} as const;

/** An item's page in the register. */
export const itemHref = paths.item;

/**
 * Addresses of the print routes. Printing is a POST (it is recorded); the POST sends the browser
 * on to the recorded print, which only the person who printed it may open, for a few minutes.
 */
export const printPaths = {
  certificate: (pair: string, opts: { copy?: boolean } = {}) => `/api/v1/pairs/${seg(pair)}/certificate${opts.copy ? "?copy=1" : ""}`,
  certificatePrint: (pair: string, printId: string) => `/api/v1/pairs/${seg(pair)}/certificate/prints/${seg(printId)}`,
  cartonLabel: (carton: string, opts: { printerDpi?: number } = {}) => `/api/v1/cartons/${seg(carton)}/label${opts.printerDpi ? `?printerDpi=${opts.printerDpi}` : ""}`,
  cartonLabelPrint: (carton: string, printId: number | string, opts: { printerDpi?: number } = {}) =>
    `/api/v1/cartons/${seg(carton)}/label/prints/${seg(String(printId))}${opts.printerDpi ? `?printerDpi=${opts.printerDpi}` : ""}`,
  labels: "/api/v1/labels",
  /** A shipment's delivery note: a GET that only reads (it is the record, not a print). */
  deliveryNote: (shipment: string) => `/api/v1/shipments/${seg(shipment)}/delivery-note`,
} as const;

/**
 * A dynamic segment as route handlers get it: Next has decoded it once already (links are built
 * with one `encodeURIComponent`), so it is never decoded again — a "%" in it is a "%". Null for an
 * empty segment, which names nothing.
 */
export function segmentValue(value: string | string[] | undefined): string | null {
  const raw = Array.isArray(value) ? value.join("/") : (value ?? "");
  return raw === "" ? null : raw;
}
