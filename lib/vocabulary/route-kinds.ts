/**
 * The kinds of thing that travel a route through the shop, each with routes of its own in the
 * route editor: a model's cabinets (a veneered pair, or a lone lacquer cabinet until assembly pairs
 * it) and a model's metal trim parts (top housing, plinth, bezel), sanded, painted and polished by
 * hand before assembly.
 */
export const ROUTE_KINDS = ["cabinet", "trim"] as const;
export type RouteKind = (typeof ROUTE_KINDS)[number];

export const ROUTE_KIND_LABEL: Record<RouteKind, string> = { cabinet: "Cabinet route", trim: "Trim-part route" };

export const isRouteKind = (v: unknown): v is RouteKind => typeof v === "string" && (ROUTE_KINDS as readonly string[]).includes(v);
