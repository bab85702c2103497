import type { FlitchPlan } from "@/lib/veneer/plan";

/**
 * The allocation plan of one flitch, drawn as a strip of leaves in slicing order. Book match
 * (Architectural Woodwork Standards §1.2.19): in each run the left face takes every other leaf
 * as cut, the right face the leaves between them turned over, so the right face's figure is
 * drawn mirrored. Server-rendered SVG: no hooks, no client code.
 */

export interface PlanPictureLeaf {
  seq: number;
  lengthMm: number | null;
  widthMm: number | null;
  usable: boolean;
  defects: { kind: string; positionMm: number | null }[];
  /** Pair serial when the leaf was already allocated to an earlier pair. */
  takenBy?: string | null;
}

export interface PlanPictureProps {
  leaves: PlanPictureLeaf[];
  plan: FlitchPlan;
  yieldFigures: { pairs: number; leavesUsed: number; faceLeaves: number; areaShare: number };
  minLengthMm: number;
  minWidthMm: number;
  title?: string;
  /** Leaves per cabinet face (k) and reserve per pair; used to explain a plan with no pair. */
  leavesPerFace?: number;
  reservePerPair?: number;
}

export type PlanPictureRole = "left" | "right" | "reserve" | "leftover" | "taken" | "unusable";

/** Leaves in one row of the strip, at most. */
export const PLAN_PICTURE_ROW = 20;

const C = {
  ink: "#1d2326",
  inkSoft: "#4f585c",
  paper: "#f6f3ec",
  surface: "#fffdf8",
  line: "#d6cfc2",
  lineStrong: "#a89f90",
  leaf: "#2e6a57",
  leafFill: "#cfe3d9",
  walnut: "#7b4f32",
  walnutFill: "#ead8c8",
  danger: "#a0372a",
  dangerSoft: "#f8e3de",
  caution: "#7d5200",
  takenFill: "#dcdcd8",
  takenLine: "#8a8f91",
};

const SANS = "var(--font-sans)";
const MONO = "var(--font-mono)";

// Geometry of the drawing, in viewBox units.
const PAD_X = 24;
const SLOT = 46; // horizontal room for one leaf
const MAX_LEAF_W = 34;
const MIN_LEAF_W = 16;
const MAX_LEAF_H = 150;
const MIN_LEAF_H = 28;
const ROW_H = 244;
const VIEW_W = PAD_X * 2 + SLOT * PLAN_PICTURE_ROW;
// Offsets inside a row.
const BRACKET_LABEL_Y = 14;
const BRACKET_Y = 24;
const SEQ_Y = 46;
const LEAF_TOP = 56;
const LEAF_BOTTOM = LEAF_TOP + MAX_LEAF_H;
const MARK_Y = LEAF_BOTTOM + 18;

/** The mirror transform for a turned leaf: scale(-1, 1) about the vertical line x = cx. */
export function mirrorAbout(cx: number): string {
  return `translate(${fmt(cx)} 0) scale(-1 1) translate(${fmt(-cx)} 0)`;
}

function fmt(n: number): string {
  return String(Math.round(n * 100) / 100);
}

/**
 * The leaf's figure: three nested "cathedral" arches with their peaks left of centre and two grain
 * lines rising from the innermost peak, the same for every leaf (only scaled to its size). Lopsided
 * on purpose, so a turned leaf visibly mirrors its neighbour and a pair shows the book's spine.
 */
export function figurePath(x: number, y: number, w: number, h: number): string {
  const P = (fx: number, fy: number) => `${fmt(x + fx * w)} ${fmt(y + fy * h)}`;
  const parts: string[] = [];
  const apexX = 0.33;
  for (let j = 0; j < 3; j++) {
    const left = 0.1 + 0.08 * (2 - j); // where the arch's left leg meets the butt end
    const right = 0.58 + 0.16 * j; // and its right leg
    const apexY = 0.62 - 0.2 * j; // the arch's peak, from the top (outer arches peak higher)
    const pts: string[] = [];
    for (let s = 0; s <= 16; s++) {
      const t = s / 16;
      const fx = left + (right - left) * t;
      const side = fx < apexX ? apexX - left : right - apexX;
      const u = (fx - apexX) / side; // -1 … 1 across the arch
      const fy = apexY + (0.97 - apexY) * Math.pow(Math.abs(u), 1.4) + 0.012 * Math.sin(9 * t + j);
      pts.push(P(fx, Math.min(0.98, fy)));
    }
    parts.push(`M${pts[0]}L${pts.slice(1).join(" ")}`);
  }
  for (let i = 0; i < 2; i++) {
    const pts: string[] = [];
    for (let s = 0; s <= 10; s++) {
      const t = s / 10;
      const fx = apexX + 0.04 + 0.18 * i + 0.16 * t + 0.035 * Math.sin(2 * Math.PI * (1.2 * t + 0.3 * i));
      pts.push(P(fx, 0.19 * (1 - t) + 0.02 * t));
    }
    parts.push(`M${pts[0]}L${pts.slice(1).join(" ")}`);
  }
  return parts.join("");
}

/** A short stable hash, so pattern ids differ between different pictures on one page. */
function hashOf(s: string): string {
  let h = 2166136261;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 16777619);
  return (h >>> 0).toString(36);
}

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** The yield line under the picture, e.g. "3 pairs · 14 of 24 leaves used (12 on faces, 2 reserve) · 61 % of the flitch's area". */
export function yieldLine(y: PlanPictureProps["yieldFigures"], leafCount: number): string {
  const reserve = y.leavesUsed - y.faceLeaves;
  return `${plural(y.pairs, "pair", "pairs")} · ${y.leavesUsed} of ${plural(leafCount, "leaf", "leaves")} used (${y.faceLeaves} on faces, ${reserve} reserve) · ${Math.round(y.areaShare * 100)} % of the flitch's area`;
}

/** The longest run of consecutive good leaves (usable, not taken, measured and big enough). */
export function longestGoodStretch(leaves: PlanPictureLeaf[], minLengthMm: number, minWidthMm: number): number {
  const sorted = [...leaves].sort((a, b) => a.seq - b.seq);
  let best = 0;
  let cur = 0;
  let prev: number | null = null;
  for (const l of sorted) {
    const good = l.usable && !l.takenBy && l.lengthMm !== null && l.widthMm !== null && l.lengthMm >= minLengthMm && l.widthMm >= minWidthMm;
    if (!good) cur = 0;
    else cur = prev !== null && l.seq === prev + 1 && cur > 0 ? cur + 1 : 1;
    prev = l.seq;
    best = Math.max(best, cur);
  }
  return best;
}

export function noPairLine(props: Pick<PlanPictureProps, "leaves" | "minLengthMm" | "minWidthMm" | "leavesPerFace" | "reservePerPair">): string {
  const n = longestGoodStretch(props.leaves, props.minLengthMm, props.minWidthMm);
  const k = props.leavesPerFace;
  const r = props.reservePerPair;
  const needs =
    k !== undefined && r !== undefined
      ? `${2 * k + r} (2 × ${k} face leaves + ${r} reserve)`
      : k !== undefined
        ? `2 × ${k} face leaves + its reserve`
        : "2k face leaves (k a face) + its reserve";
  return `No pair fits: the longest unbroken stretch of good leaves is ${n}, a pair needs ${needs}`;
}

type Mark = "L" | "R↺" | "res" | "spare" | "✕" | "short" | "used" | "?";

interface Placed {
  leaf: PlanPictureLeaf;
  role: PlanPictureRole;
  mark: Mark;
  short: boolean;
  run: number | null; // index into plan.runs
  row: number;
  col: number;
}

function roleOf(leaf: PlanPictureLeaf, where: Map<number, { run: number; part: "left" | "right" | "reserve" }>, minL: number, minW: number) {
  const w = where.get(leaf.seq);
  const measured = leaf.lengthMm !== null && leaf.widthMm !== null;
  const short = measured && (leaf.lengthMm! < minL || leaf.widthMm! < minW);
  if (w) return { role: w.part as PlanPictureRole, mark: (w.part === "left" ? "L" : w.part === "right" ? "R↺" : "res") as Mark, short, run: w.run };
  if (leaf.takenBy) return { role: "taken" as const, mark: "used" as Mark, short, run: null };
  if (!leaf.usable) return { role: "unusable" as const, mark: "✕" as Mark, short, run: null };
  if (!measured) return { role: "leftover" as const, mark: "?" as Mark, short, run: null };
  if (short) return { role: "leftover" as const, mark: "short" as Mark, short, run: null };
  return { role: "leftover" as const, mark: "spare" as Mark, short, run: null };
}

const ROLE_WORDS: Record<PlanPictureRole, string> = {
  left: "left face, as cut",
  right: "right face, turned over",
  reserve: "reserve for repairs",
  leftover: "not allocated",
  taken: "already in an earlier pair",
  unusable: "unusable",
};

export function PlanPicture(props: PlanPictureProps) {
  const { plan, yieldFigures, minLengthMm, minWidthMm } = props;
  const leaves = [...props.leaves].sort((a, b) => a.seq - b.seq);
  const where = new Map<number, { run: number; part: "left" | "right" | "reserve" }>();
  plan.runs.forEach((r, i) => {
    for (const s of r.left) where.set(s, { run: i, part: "left" });
    for (const s of r.right) where.set(s, { run: i, part: "right" });
    for (const s of r.reserve) where.set(s, { run: i, part: "reserve" });
  });

  // Place leaves into rows of at most 20, starting a new row rather than splitting a run when the run fits in one row.
  const placed: Placed[] = [];
  let row = 0;
  let col = 0;
  for (let i = 0; i < leaves.length; ) {
    const leaf = leaves[i]!;
    const r = roleOf(leaf, where, minLengthMm, minWidthMm);
    let unit = 1;
    if (r.run !== null) {
      while (i + unit < leaves.length && where.get(leaves[i + unit]!.seq)?.run === r.run) unit++;
    }
    if (col > 0 && col + unit > PLAN_PICTURE_ROW && unit <= PLAN_PICTURE_ROW) {
      row++;
      col = 0;
    }
    for (let j = 0; j < unit; j++) {
      const l = leaves[i + j]!;
      const rr = j === 0 ? r : roleOf(l, where, minLengthMm, minWidthMm);
      if (col >= PLAN_PICTURE_ROW) {
        row++;
        col = 0;
      }
      placed.push({ leaf: l, ...rr, row, col });
      col++;
    }
    i += unit;
  }
  const rows = placed.length === 0 ? 1 : placed[placed.length - 1]!.row + 1;

  const maxLen = Math.max(1, ...leaves.map((l) => l.lengthMm ?? 0));
  const maxWid = Math.max(1, ...leaves.map((l) => l.widthMm ?? 0));
  const size = (l: PlanPictureLeaf) => ({
    w: l.widthMm === null ? MAX_LEAF_W * 0.7 : Math.max(MIN_LEAF_W, (MAX_LEAF_W * l.widthMm) / maxWid),
    h: l.lengthMm === null ? MAX_LEAF_H * 0.6 : Math.max(MIN_LEAF_H, (MAX_LEAF_H * l.lengthMm) / maxLen),
  });
  const slotX = (c: number) => PAD_X + c * SLOT + SLOT / 2; // centre of a slot
  const rowY = (r: number) => r * ROW_H;

  const stripH = rows * ROW_H;
  const legendTop = stripH + 8;
  const LEGEND_COLS = 4;
  const LEGEND_ROW_H = 30;
  const summaryY = legendTop + 2 * LEGEND_ROW_H + 34;
  const viewH = summaryY + 18;

  const leafCount = leaves.length;
  const summary = plan.pairs === 0 ? noPairLine(props) : yieldLine(yieldFigures, leafCount);
  const title = props.title ?? "Veneer allocation plan";
  const ariaLabel = `${title}: ${leafCount} leaves in slicing order. ${summary}.`;
  const desc =
    plan.runs
      .map(
        (r, i) =>
          `Run ${i + 1}: left face leaves ${r.left.join(", ")}; right face leaves ${r.right.join(", ")} turned over` +
          (r.reserve.length ? `; reserve ${r.reserve.join(", ")}` : ""),
      )
      .join(". ") || "No runs.";

  const id = `tlpp-${hashOf(JSON.stringify([leaves.map((l) => l.seq), placed.map((p) => p.role)]))}`;
  const pat = { reserve: `${id}-reserve`, unusable: `${id}-unusable` };

  const style = (p: Placed) => {
    switch (p.role) {
      case "left":
        return { fill: C.leafFill, stroke: C.leaf, figure: C.leaf, dash: undefined };
      case "right":
        return { fill: C.walnutFill, stroke: C.walnut, figure: C.walnut, dash: undefined };
      case "reserve":
        return { fill: `url(#${pat.reserve})`, stroke: C.inkSoft, figure: C.inkSoft, dash: undefined };
      case "taken":
        return { fill: C.takenFill, stroke: C.takenLine, figure: C.takenLine, dash: undefined };
      case "unusable":
        return { fill: `url(#${pat.unusable})`, stroke: C.danger, figure: C.danger, dash: undefined };
      case "leftover":
        return { fill: C.surface, stroke: p.short ? C.caution : C.lineStrong, figure: C.lineStrong, dash: p.leaf.lengthMm === null || p.leaf.widthMm === null ? "2 3" : "4 3" };
    }
  };
  const markColour = (p: Placed) =>
    p.role === "left" ? C.leaf : p.role === "right" ? C.walnut : p.role === "unusable" ? C.danger : p.mark === "short" ? C.caution : p.role === "taken" ? C.takenLine : C.inkSoft;

  // Run brackets, one segment per row the run touches.
  const brackets: { run: number; row: number; x1: number; x2: number; faceEnd: number; first: boolean; last: boolean }[] = [];
  plan.runs.forEach((_, i) => {
    const mine = placed.filter((p) => p.run === i);
    const byRow = new Map<number, Placed[]>();
    for (const p of mine) byRow.set(p.row, [...(byRow.get(p.row) ?? []), p]);
    const segments = [...byRow.entries()].sort((a, b) => a[0] - b[0]);
    segments.forEach(([r, ps], n) => {
      const cols = ps.map((p) => p.col);
      const faceCols = ps.filter((p) => p.role === "left" || p.role === "right").map((p) => p.col);
      const x1 = PAD_X + Math.min(...cols) * SLOT + 3;
      const x2 = PAD_X + (Math.max(...cols) + 1) * SLOT - 3;
      const faceEnd = faceCols.length ? PAD_X + (Math.max(...faceCols) + 1) * SLOT - 3 : x1;
      brackets.push({ run: i, row: r, x1, x2, faceEnd, first: n === 0, last: n === segments.length - 1 });
    });
  });

  const legend: { key: string; mark: string; words: string; fill: string; stroke: string; dash?: string; cross?: boolean }[] = [
    { key: "left", mark: "L", words: "left face, as cut", fill: C.leafFill, stroke: C.leaf },
    { key: "right", mark: "R↺", words: "right face, turned over", fill: C.walnutFill, stroke: C.walnut },
    { key: "reserve", mark: "res", words: "reserve for repairs", fill: `url(#${pat.reserve})`, stroke: C.inkSoft },
    { key: "spare", mark: "spare", words: "good, not allocated", fill: C.surface, stroke: C.lineStrong, dash: "4 3" },
    { key: "unusable", mark: "✕", words: "unusable or defect (✕ where found)", fill: `url(#${pat.unusable})`, stroke: C.danger, cross: true },
    { key: "short", mark: "short", words: `under ${minLengthMm} × ${minWidthMm} mm`, fill: C.surface, stroke: C.caution, dash: "4 3" },
    { key: "used", mark: "used", words: "in an earlier pair", fill: C.takenFill, stroke: C.takenLine },
    { key: "unmeasured", mark: "?", words: "not measured yet", fill: C.surface, stroke: C.lineStrong, dash: "2 3" },
  ];
  const legendColW = (VIEW_W - 2 * PAD_X) / LEGEND_COLS;

  return (
    <svg
      data-testid="plan-picture"
      role="img"
      aria-label={ariaLabel}
      viewBox={`0 0 ${VIEW_W} ${fmt(viewH)}`}
      width="100%"
      preserveAspectRatio="xMinYMin meet"
      xmlns="http://www.w3.org/2000/svg"
      fontFamily={SANS}
      style={{ display: "block", height: "auto", maxWidth: "100%" }}
    >
      <title>{title}</title>
      <desc>{desc}</desc>
      <defs>
        <pattern id={pat.reserve} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
          <rect width="6" height="6" fill={C.surface} />
          <line x1="0" y1="0" x2="0" y2="6" stroke={C.inkSoft} strokeWidth="1.6" strokeOpacity="0.55" />
        </pattern>
        <pattern id={pat.unusable} width="7" height="7" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
          <rect width="7" height="7" fill={C.dangerSoft} />
          <line x1="0" y1="0" x2="0" y2="7" stroke={C.danger} strokeWidth="1" strokeOpacity="0.6" />
          <line x1="0" y1="0" x2="7" y2="0" stroke={C.danger} strokeWidth="1" strokeOpacity="0.6" />
        </pattern>
      </defs>

      {brackets.map((b) => {
        const y = rowY(b.row) + BRACKET_Y;
        const label = b.first ? `Run ${b.run + 1} · pair` : `Run ${b.run + 1} cont.`;
        const short = `R${b.run + 1}`;
        const fits = label.length * 6.4 <= b.x2 - b.x1;
        return (
          <g key={`b-${b.run}-${b.row}`} data-run={b.run + 1} aria-hidden="true">
            {/* A run that goes on in the next row leaves its bracket open at the row's end, and the next row's part open at its start. */}
            <path
              d={`M${fmt(b.x1)} ${b.first ? y + 7 : y}V${y}H${fmt(b.faceEnd)}${b.faceEnd >= b.x2 && b.last ? `V${y + 7}` : ""}`}
              fill="none"
              stroke={C.ink}
              strokeWidth="1.4"
            />
            {b.faceEnd < b.x2 ? (
              <path d={`M${fmt(b.faceEnd)} ${y}H${fmt(b.x2)}${b.last ? `V${y + 7}` : ""}`} fill="none" stroke={C.inkSoft} strokeWidth="1.4" strokeDasharray="3 2" />
            ) : null}
            <text x={fmt((b.x1 + b.x2) / 2)} y={rowY(b.row) + BRACKET_LABEL_Y} textAnchor="middle" fontSize="12" fontWeight="600" fill={C.ink}>
              {fits ? label : short}
            </text>
          </g>
        );
      })}

      {placed.map((p) => {
        const { w, h } = size(p.leaf);
        const cx = slotX(p.col);
        const x = cx - w / 2;
        const bottom = rowY(p.row) + LEAF_BOTTOM;
        const y = bottom - h;
        const s = style(p);
        const turned = p.role === "right";
        const words =
          `Leaf ${p.leaf.seq}: ${p.mark === "short" ? "below the minimum size" : p.mark === "?" ? "not measured" : ROLE_WORDS[p.role]}` +
          (p.role === "taken" && p.leaf.takenBy ? ` (${p.leaf.takenBy})` : "") +
          (p.leaf.lengthMm !== null && p.leaf.widthMm !== null ? `, ${p.leaf.lengthMm} × ${p.leaf.widthMm} mm` : "") +
          (p.leaf.defects.length ? `; ${p.leaf.defects.map((d) => d.kind + (d.positionMm !== null ? ` at ${d.positionMm} mm` : "")).join(", ")}` : "");
        return (
          <g key={p.leaf.seq} data-seq={p.leaf.seq} data-role={p.role} data-short={p.short ? "true" : undefined} data-taken-by={p.leaf.takenBy ?? undefined}>
            <title>{words}</title>
            <text x={fmt(cx)} y={rowY(p.row) + SEQ_Y} textAnchor="middle" fontFamily={MONO} fontSize="12" fill={C.ink}>
              {p.leaf.seq}
            </text>
            <g data-body={turned ? "turned" : "as-cut"} transform={turned ? mirrorAbout(cx) : undefined}>
              <rect x={fmt(x)} y={fmt(y)} width={fmt(w)} height={fmt(h)} rx="2" fill={s.fill} stroke={s.stroke} strokeWidth="1.4" strokeDasharray={s.dash} />
              <path d={figurePath(x, y, w, h)} fill="none" stroke={s.figure} strokeWidth="1.1" strokeOpacity="0.6" strokeLinecap="round" strokeLinejoin="round" />
            </g>
            {p.leaf.defects.map((d, i) => {
              const frac = d.positionMm !== null && p.leaf.lengthMm ? Math.min(1, Math.max(0, d.positionMm / p.leaf.lengthMm)) : 0.5;
              const dy = Math.min(bottom - 5, Math.max(y + 5, bottom - frac * h));
              return (
                <path
                  key={i}
                  data-defect={d.kind}
                  d={`M${fmt(cx - 5)} ${fmt(dy - 5)}L${fmt(cx + 5)} ${fmt(dy + 5)}M${fmt(cx + 5)} ${fmt(dy - 5)}L${fmt(cx - 5)} ${fmt(dy + 5)}`}
                  stroke={C.danger}
                  strokeWidth="2.2"
                  strokeLinecap="round"
                />
              );
            })}
            <text x={fmt(cx)} y={rowY(p.row) + MARK_Y} textAnchor="middle" fontSize={p.mark.length > 3 ? "10.5" : "12"} fontWeight={p.run !== null ? "600" : "400"} fill={markColour(p)}>
              {p.mark}
            </text>
          </g>
        );
      })}

      <g aria-hidden="true">
        {legend.map((item, i) => {
          const lx = PAD_X + (i % LEGEND_COLS) * legendColW;
          const ly = legendTop + Math.floor(i / LEGEND_COLS) * LEGEND_ROW_H;
          return (
            <g key={item.key} data-legend={item.key}>
              <rect x={lx} y={ly} width="14" height="22" rx="2" fill={item.fill} stroke={item.stroke} strokeWidth="1.4" strokeDasharray={item.dash} />
              {item.cross ? <path d={`M${lx + 3} ${ly + 7}l8 8m0 -8l-8 8`} stroke={C.danger} strokeWidth="2" strokeLinecap="round" /> : null}
              <text x={lx + 22} y={ly + 16} fontSize="12" fill={C.ink}>
                <tspan fontWeight="600">{item.mark}</tspan>
                <tspan dx="6" fill={C.inkSoft}>
                  {item.words}
                </tspan>
              </text>
            </g>
          );
        })}
      </g>

      <text data-testid="plan-picture-summary" x={PAD_X} y={fmt(summaryY)} fontSize="14" fontWeight="600" fill={plan.pairs === 0 ? C.danger : C.ink}>
        {summary}
      </text>
    </svg>
  );
}

export default PlanPicture;
