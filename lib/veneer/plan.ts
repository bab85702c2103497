/**
 * Bookmatched leaf allocation for one flitch. A pair's two cabinet faces take 2k consecutive
 * leaves (k = leaves per face): the left face the 1st, 3rd, 5th… of them, the right face the 2nd,
 * 4th, 6th…, turned over like the pages of a book, so the figure mirrors across the pair (book
 * match: Architectural Woodwork Standards §1.2.19; ANSI/HPVA HP-1). Right after the run,
 * `reservePerPair` further consecutive leaves are held for that pair's repairs (common practice).
 */
export interface PlanLeaf {
  seq: number;
  lengthMm: number;
  widthMm: number;
  usable: boolean;
}

export interface PlanSpec {
  leavesPerFace: number;
  minLengthMm: number;
  minWidthMm: number;
  reservePerPair: number;
}

export interface PlanRun {
  left: number[];
  right: number[];
  reserve: number[];
}

export interface FlitchPlan {
  pairs: number;
  runs: PlanRun[];
  leftover: number[];
}

function checkSpec(spec: PlanSpec) {
  if (!Number.isInteger(spec.leavesPerFace) || spec.leavesPerFace < 1) throw new Error("leavesPerFace must be a whole number of at least 1.");
  if (!Number.isInteger(spec.reservePerPair) || spec.reservePerPair < 0) throw new Error("reservePerPair must be a whole number of at least 0.");
  if (!(spec.minLengthMm >= 0) || !(spec.minWidthMm >= 0)) throw new Error("The minimum leaf size must be zero or more.");
}

/**
 * The most pairs the flitch can give and, among plans with as many, the one using the earliest
 * leaves. A leaf that is defective, short, narrow, or missing from the slicing order (a gap in
 * `seq`) breaks a run. Runs cannot span a break, so each unbroken stretch of good leaves is
 * independent: packing whole blocks (run + reserve) from the start of every stretch gives the
 * most blocks any plan can fit there (⌊length / block⌋), and no plan starts them earlier.
 */
export function planFlitch(leaves: PlanLeaf[], spec: PlanSpec): FlitchPlan {
  checkSpec(spec);
  const sorted = [...leaves].sort((a, b) => a.seq - b.seq);
  for (let i = 1; i < sorted.length; i++) {
    if (sorted[i]!.seq === sorted[i - 1]!.seq) throw new Error(`Leaf ${sorted[i]!.seq} appears twice.`);
  }
  const k = spec.leavesPerFace;
  const block = 2 * k + spec.reservePerPair;
  const good = (l: PlanLeaf) => l.usable && l.lengthMm >= spec.minLengthMm && l.widthMm >= spec.minWidthMm;

  const runs: PlanRun[] = [];
  const used = new Set<number>();
  let stretch: number[] = [];
  const flush = () => {
    for (let start = 0; start + block <= stretch.length; start += block) {
      const run = stretch.slice(start, start + 2 * k);
      runs.push({
        left: run.filter((_, i) => i % 2 === 0),
        right: run.filter((_, i) => i % 2 === 1),
        reserve: stretch.slice(start + 2 * k, start + block),
      });
      for (const seq of stretch.slice(start, start + block)) used.add(seq);
    }
    stretch = [];
  };
  for (let i = 0; i < sorted.length; i++) {
    const leaf = sorted[i]!;
    const continues = stretch.length > 0 && leaf.seq === stretch[stretch.length - 1]! + 1;
    if (!good(leaf)) {
      flush();
      continue;
    }
    if (!continues) flush();
    stretch.push(leaf.seq);
  }
  flush();
  return { pairs: runs.length, runs, leftover: sorted.map((l) => l.seq).filter((s) => !used.has(s)) };
}

/** Yield of a plan: leaves used (runs and reserves) and their share of the flitch's area. */
export function planYield(leaves: PlanLeaf[], plan: FlitchPlan): { leavesUsed: number; faceLeaves: number; areaShare: number } {
  const bySeq = new Map(leaves.map((l) => [l.seq, l]));
  const area = (seqs: number[]) => seqs.reduce((sum, s) => sum + (bySeq.get(s)?.lengthMm ?? 0) * (bySeq.get(s)?.widthMm ?? 0), 0);
  const face = plan.runs.flatMap((r) => [...r.left, ...r.right]);
  const all = plan.runs.flatMap((r) => [...r.left, ...r.right, ...r.reserve]);
  const total = area(leaves.map((l) => l.seq));
  return { leavesUsed: all.length, faceLeaves: face.length, areaShare: total > 0 ? area(all) / total : 0 };
}

/**
 * Why a proposed run breaks the rules, or [] when it keeps them: 2k consecutive leaves with the
 * left face on the 1st, 3rd… and the right face on the 2nd, 4th…, then the reserve right after,
 * every one of them good. The server checks what a browser sends against this before writing.
 */
export function checkRun(leaves: PlanLeaf[], spec: PlanSpec, run: PlanRun): string[] {
  checkSpec(spec);
  const k = spec.leavesPerFace;
  const problems: string[] = [];
  if (run.left.length !== k || run.right.length !== k) problems.push(`A face takes ${k} leaves; this run has ${run.left.length} left and ${run.right.length} right.`);
  if (run.reserve.length !== spec.reservePerPair) problems.push(`A pair holds ${spec.reservePerPair} reserve leaves; this run has ${run.reserve.length}.`);
  if (problems.length) return problems;
  const start = run.left[0]!;
  const expected = Array.from({ length: 2 * k + spec.reservePerPair }, (_, i) => start + i);
  const actual = [...run.left.flatMap((l, i) => [l, run.right[i]!]), ...run.reserve];
  if (actual.some((s, i) => s !== expected[i])) {
    problems.push(`Leaves ${actual.join(", ")} are not ${expected.join(", ")}: a run takes consecutive leaves, left and right alternating, then its reserve.`);
    return problems;
  }
  const bySeq = new Map(leaves.map((l) => [l.seq, l]));
  for (const seq of expected) {
    const leaf = bySeq.get(seq);
    if (!leaf) problems.push(`Leaf ${seq} is not free in this flitch.`);
    else if (!leaf.usable) problems.push(`Leaf ${seq} is not usable.`);
    else if (leaf.lengthMm < spec.minLengthMm || leaf.widthMm < spec.minWidthMm) {
      problems.push(`Leaf ${seq} (${leaf.lengthMm} × ${leaf.widthMm} mm) is smaller than ${spec.minLengthMm} × ${spec.minWidthMm} mm.`);
    }
  }
  return problems;
}

/** "leaf 5" or "leaves 5, 6": leaf numbers as a phrase. */
export function leafList(seqs: readonly number[]): string {
  return `${seqs.length === 1 ? "leaf" : "leaves"} ${seqs.join(", ")}`;
}
