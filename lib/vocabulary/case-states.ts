/**
 * A service case's states and the changes between them (the database's trigger holds the same
 * table). A case moves forward through the repair; "cancelled" ends it from any open state.
 */
export const CASE_STATES = ["received", "diagnosed", "waiting_part", "waiting_payment", "repaired", "tested", "sent_back", "closed", "cancelled"] as const;
export type CaseState = (typeof CASE_STATES)[number];

/** States in which the case is still open: its pair cannot be taken in by another case. */
export const OPEN_CASE_STATES = ["received", "diagnosed", "waiting_part", "waiting_payment", "repaired", "tested", "sent_back"] as const satisfies readonly CaseState[];

/** The desk's words for each state. */
export const CASE_STATE_WORDS: Record<CaseState, string> = {
  received: "Received",
  diagnosed: "Diagnosed",
  waiting_part: "Waiting for a part",
  waiting_payment: "Waiting for payment",
  repaired: "Repaired",
  tested: "Tested",
  sent_back: "Sent back",
  closed: "Closed",
  cancelled: "Cancelled",
};

/**
 * Where each state may go next. A failed re-test sends a repaired case back to "diagnosed"; a
 * part that arrives or a payment that is made sends a waiting case back to "diagnosed" (ready to
 * repair) or straight on to "repaired".
 */
export const CASE_TRANSITIONS: Record<CaseState, readonly CaseState[]> = {
  received: ["diagnosed", "cancelled"],
  diagnosed: ["waiting_part", "waiting_payment", "repaired", "cancelled"],
  waiting_part: ["diagnosed", "waiting_payment", "repaired", "cancelled"],
  waiting_payment: ["diagnosed", "waiting_part", "repaired", "cancelled"],
  repaired: ["tested", "diagnosed", "cancelled"],
  tested: ["sent_back", "cancelled"],
  sent_back: ["closed"],
  closed: [],
  cancelled: [],
};

export const isCaseState = (v: unknown): v is CaseState => typeof v === "string" && (CASE_STATES as readonly string[]).includes(v);
export const canMove = (from: CaseState, to: CaseState): boolean => CASE_TRANSITIONS[from].includes(to);
