/** Where assembly records its work. */
export const ASSEMBLY_STATION = "assembly";
