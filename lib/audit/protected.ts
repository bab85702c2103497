// The tables whose rows record what happened, in words a workshop person uses, and what each of
// their triggers keeps. Pure: the audit page and the scripts both read it.

/** Every append-only table: each has a `<table>_no_delete` and a `<table>_no_replace` trigger. */
export const APPEND_ONLY_TABLES = {
  events: "the event log",
  links: "links between parts",
  items: "the register of serials",
  outbox: "queued mail",
  mail_attempts: "mail delivery tries",
  ownerships: "ownerships",
  flitches: "flitch intakes",
  veneer_leaves: "veneer leaves",
  leaf_allocations: "leaf allocations",
  leaf_defects: "leaf defects",
  uploads: "photos and files",
  unit_batches: "drive-unit batches",
  batch_units: "units in batches",
  responses: "response measurements",
  ts_params: "Thiele–Small measurements",
  matched_sets: "matched sets",
  set_members: "units reserved in sets",
  crossover_parts: "crossover parts",
  machine_tokens: "machine tokens",
  process_specs: "route versions",
  route_starts: "route starts",
  route_records: "route records",
  route_corrections: "corrections of route readings",
  nonconformances: "nonconformances",
  final_tests: "final pair tests",
  certificates: "certificates",
  certificate_prints: "certificate prints",
  carton_locations: "carton locations",
  shipment_details: "shipments",
  service_cases: "service cases",
  case_findings: "diagnosis findings",
  certificate_revisions: "certificate revisions",
  certificate_revision_prints: "prints of certificate revisions",
  quotes: "repair quotes",
  payment_requests: "payment links",
  payments: "payments",
  refunds: "refunds",
  owner_consents: "owners' consents to be contacted",
  case_reservations: "parts reserved for service cases",
  containments: "containments",
  containment_items: "serials affected by containments",
  containment_notices: "containment notices",
  model_versions: "model versions",
  item_model_versions: "the model version each item was made under",
} as const satisfies Record<string, string>;

export type AppendOnlyTable = keyof typeof APPEND_ONLY_TABLES;
export const appendOnlyTables = Object.keys(APPEND_ONLY_TABLES) as AppendOnlyTable[];

/** The triggers every append-only table must have, whatever else guards its updates. */
export function requiredTriggers(table: AppendOnlyTable): string[] {
  return [`${table}_no_delete`, `${table}_no_replace`];
}

/** A table's name in words, for any table (those outside the list keep their own name). */
export function tableWords(table: string): string {
  return (APPEND_ONLY_TABLES as Record<string, string>)[table] ?? `the table “${table}”`;
}

/** What a trigger keeps, from the naming the migrations follow. */
export function triggerPurpose(name: string): string {
  if (name === "events_chain_linear") return "keeps every new event chained to the newest one";
  if (name.endsWith("_no_delete")) return "refuses deleting its rows";
  if (name.endsWith("_no_update")) return "refuses changing its rows";
  if (name.endsWith("_no_replace")) return "refuses replacing its rows";
  if (/_(end|revoke|clear|disposition)_once$/.test(name)) return "allows only the one change its rows may take, once";
  if (/_(rowid|keys|identity|order)_fixed$/.test(name)) return "keeps each row's identity fixed";
  return "keeps its rows consistent";
}
