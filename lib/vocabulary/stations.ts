/**
 * Where work is recorded. The routes' stations (cabinets and metal trim parts) are the shop's machines and benches; the
 * other stations are the areas of work (and the two places Twinleaf itself records from). Every
 * event names one of them, taken from the server, never from the request.
 */
export const ROUTE_STATIONS = ["press", "trim", "brace", "sanding", "inspection", "lacquer", "oven", "flatting", "cure", "polish", "finish", "metal-sanding", "paint"] as const;
export type RouteStation = (typeof ROUTE_STATIONS)[number];

export const AREA_STATIONS = ["veneer", "cabinet", "lab", "lab-bench", "assembly", "packing", "service", "quality", "admin", "sign-in", "seed"] as const;
export type AreaStation = (typeof AREA_STATIONS)[number];

export type Station = RouteStation | AreaStation;

export const STATION_NAME: Record<Station, string> = {
  press: "Forming press",
  trim: "Trimming",
  brace: "Brace fitting",
  sanding: "Sanding",
  inspection: "Hand checks",
  lacquer: "Lacquer booth",
  oven: "Stoving oven",
  flatting: "Flatting",
  cure: "Curing racks",
  polish: "Polishing",
  finish: "Hand finish",
  "metal-sanding": "Metal sanding bench",
  paint: "Paint bench",
  veneer: "Veneer room",
  cabinet: "Cabinet shop",
  lab: "Lab",
  "lab-bench": "Lab test bench",
  assembly: "Assembly",
  packing: "Packing",
  service: "Service desk",
  quality: "Quality",
  admin: "Administration",
  "sign-in": "Sign-in",
  seed: "Demo set-up",
};

export const isRouteStation = (v: unknown): v is RouteStation => typeof v === "string" && (ROUTE_STATIONS as readonly string[]).includes(v);

/** A station's name; a code recorded before this list existed is shown as it is. */
export const stationName = (code: string): string => (code in STATION_NAME ? STATION_NAME[code as Station] : code);
