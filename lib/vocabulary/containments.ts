/**
 * A containment's words, shared by the server and the browser: how severe it is, where each
 * affected serial was when it was raised, and the states an affected serial moves through (the
 * database's trigger holds the same table).
 */
export const CONTAINMENT_SEVERITIES = ["minor", "major", "critical"] as const;
export type ContainmentSeverity = (typeof CONTAINMENT_SEVERITIES)[number];

export const SEVERITY_LABEL: Record<ContainmentSeverity, string> = { minor: "Minor", major: "Major", critical: "Critical" };
/** What each severity means, beside its label. */
export const SEVERITY_MEANING: Record<ContainmentSeverity, string> = {
  minor: "no risk to people, the sound may suffer",
  major: "the speaker may fail in use",
  critical: "a risk to people or property",
};
/** Label and meaning together, as the raise form offers them: "Major: the speaker may fail in use". */
export const SEVERITY_WORDS = Object.fromEntries(CONTAINMENT_SEVERITIES.map((s) => [s, `${SEVERITY_LABEL[s]}: ${SEVERITY_MEANING[s]}`])) as Record<ContainmentSeverity, string>;
/** The badge tone of each severity on the quality pages. */
export const SEVERITY_TONE = { minor: "info", major: "caution", critical: "danger" } as const satisfies Record<ContainmentSeverity, string>;

export const AFFECTED_GROUPS = ["in_build", "in_stock", "packed", "shipped"] as const;
export type AffectedGroup = (typeof AFFECTED_GROUPS)[number];

export const GROUP_LABEL: Record<AffectedGroup, string> = {
  in_build: "In build",
  in_stock: "In stock",
  packed: "Packed",
  shipped: "Shipped",
};

/** What the containment does to a serial of each group until it is released. */
export const GROUP_EFFECT: Record<AffectedGroup, string> = {
  in_build: "On hold: its stations and assembly refuse it.",
  in_stock: "Quarantined: the lab's matching, assembly and the service desk's replacements skip it.",
  packed: "Held at dispatch: shipping refuses it.",
  shipped: "Out with a dealer or an owner: tell them, and inspect it when it comes in.",
};

/**
 * An affected serial's states. "open" until someone acts; "notified" once its dealer (and owner)
 * were told; "passed" and "failed" after inspection; "cleared" and "replaced" end it. A failed
 * shipped serial has a service case, and the case takes it from there.
 */
export const AFFECTED_STATES = ["open", "notified", "passed", "failed", "cleared", "replaced"] as const;
export type AffectedState = (typeof AFFECTED_STATES)[number];

export const AFFECTED_STATE_WORDS: Record<AffectedState, string> = {
  open: "Not yet dealt with",
  notified: "Notified",
  passed: "Inspected: passed",
  failed: "Inspected: failed",
  cleared: "Cleared",
  replaced: "Replaced",
};

export const AFFECTED_TRANSITIONS: Record<AffectedState, readonly AffectedState[]> = {
  open: ["notified", "passed", "failed", "cleared", "replaced"],
  notified: ["passed", "failed", "cleared", "replaced"],
  passed: ["cleared", "replaced", "failed"],
  failed: ["cleared", "replaced"],
  cleared: [],
  replaced: [],
};

/** The moves a person makes on the containment's page (notification goes with the notices). */
export const AFFECTED_ACTIONS = ["passed", "failed", "cleared", "replaced"] as const satisfies readonly AffectedState[];
export type AffectedAction = (typeof AFFECTED_ACTIONS)[number];
export const AFFECTED_ACTION_WORDS: Record<AffectedAction, string> = {
  passed: "Inspected: passed",
  failed: "Inspected: failed",
  cleared: "Cleared (release the hold)",
  replaced: "Replaced",
};

/** States that no longer hold the serial: the hold ends with an event when a serial reaches one. */
export const RELEASED_STATES: readonly AffectedState[] = ["cleared", "replaced"];

export const isAffectedState = (v: unknown): v is AffectedState => typeof v === "string" && (AFFECTED_STATES as readonly string[]).includes(v);
export const isSeverity = (v: unknown): v is ContainmentSeverity => typeof v === "string" && (CONTAINMENT_SEVERITIES as readonly string[]).includes(v);
export const canMoveAffected = (from: AffectedState, to: AffectedState): boolean => AFFECTED_TRANSITIONS[from].includes(to);

/**
 * Dispositioned: nothing more is owed on this serial. Cleared and replaced end it; a failed
 * shipped serial is dispositioned once its service case is open.
 */
export const isDispositioned = (row: { state: AffectedState; caseId: string | null }): boolean =>
  row.state === "cleared" || row.state === "replaced" || (row.state === "failed" && row.caseId !== null);
