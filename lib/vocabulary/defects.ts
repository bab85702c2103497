/** The kinds of defect a veneer leaf can carry, as the veneer room names them. */
export const DEFECT_KINDS = ["split", "knot", "hole", "stain", "buckle", "sapwood", "mineral streak", "other"] as const;
export type DefectKind = (typeof DEFECT_KINDS)[number];
