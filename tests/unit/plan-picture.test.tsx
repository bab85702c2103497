import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, test } from "vitest";
import { PlanPicture, type PlanPictureLeaf } from "@/components/veneer/plan-picture";
import { planFlitch, planYield, type PlanLeaf, type PlanSpec } from "@/lib/veneer/plan";
import { seededRandom as rng } from "../fixtures/random";

// Every flitch below is made up for its test case.
const spec = (o: Partial<PlanSpec> = {}): PlanSpec => ({ leavesPerFace: 2, minLengthMm: 900, minWidthMm: 150, reservePerPair: 1, ...o });

function render(leaves: PlanPictureLeaf[], s: PlanSpec, title?: string) {
  const forPlan: PlanLeaf[] = leaves.map((l) => ({ seq: l.seq, lengthMm: l.lengthMm ?? 0, widthMm: l.widthMm ?? 0, usable: l.usable && !l.takenBy }));
  const plan = planFlitch(forPlan, s);
  const y = planYield(forPlan, plan);
  const html = renderToStaticMarkup(
    <PlanPicture
      leaves={leaves}
      plan={plan}
      yieldFigures={{ pairs: plan.pairs, ...y }}
      minLengthMm={s.minLengthMm}
      minWidthMm={s.minWidthMm}
      leavesPerFace={s.leavesPerFace}
      reservePerPair={s.reservePerPair}
      title={title}
    />,
  );
  return { html, plan };
}

/** Each leaf's <g data-seq data-role>: its seq, role, and whether its body carries the mirror transform. */
function leafGroups(html: string) {
  const out: { seq: number; role: string; turned: boolean; mirrored: boolean; mark: string }[] = [];
  // Split on leaf groups instead of trusting nesting: each starts with data-seq and ends before the next.
  const starts = [...html.matchAll(/<g data-seq="(\d+)" data-role="([a-z]+)"/g)];
  starts.forEach((m, i) => {
    const body = html.slice(m.index!, i + 1 < starts.length ? starts[i + 1]!.index! : html.indexOf('<g aria-hidden="true"><g data-legend'));
    const texts = [...body.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((t) => t[1]!);
    out.push({
      seq: Number(m[1]),
      role: m[2]!,
      turned: /data-body="turned"/.test(body),
      mirrored: /scale\(-1 1\)/.test(body),
      mark: texts[texts.length - 1] ?? "",
    });
  });
  return out;
}

const leaf = (seq: number, o: Partial<PlanPictureLeaf> = {}): PlanPictureLeaf => ({
  seq,
  lengthMm: 1000 + ((seq * 7) % 30),
  widthMm: 200 + ((seq * 11) % 20),
  usable: true,
  defects: [],
  ...o,
});

describe("PlanPicture", () => {
  // 12 leaves, 2 per face, 1 reserve: leaf 1 already taken, leaf 7 split, leaf 12 short.
  const small = [
    leaf(1, { takenBy: "PR-1001-X" }),
    leaf(2),
    leaf(3),
    leaf(4),
    leaf(5),
    leaf(6),
    leaf(7, { usable: false, defects: [{ kind: "split", positionMm: 300 }] }),
    leaf(8),
    leaf(9),
    leaf(10),
    leaf(11),
    leaf(12, { lengthMm: 700 }),
  ];

  test("every leaf appears once, with the role the plan gives it", () => {
    const { html, plan } = render(small, spec());
    expect(plan.runs).toEqual([{ left: [2, 4], right: [3, 5], reserve: [6] }]);
    const groups = leafGroups(html);
    expect(groups.map((g) => g.seq)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(Object.fromEntries(groups.map((g) => [g.seq, g.role]))).toEqual({
      1: "taken",
      2: "left",
      3: "right",
      4: "left",
      5: "right",
      6: "reserve",
      7: "unusable",
      8: "leftover",
      9: "leftover",
      10: "leftover",
      11: "leftover",
      12: "leftover",
    });
    // Not by colour alone: each leaf has a text mark under it.
    expect(Object.fromEntries(groups.map((g) => [g.seq, g.mark]))).toEqual({
      1: "used",
      2: "L",
      3: "R↺",
      4: "L",
      5: "R↺",
      6: "res",
      7: "✕",
      8: "spare",
      9: "spare",
      10: "spare",
      11: "spare",
      12: "short",
    });
  });

  test("right-face leaves carry the mirror transform; left-face and other leaves do not", () => {
    const groups = leafGroups(render(small, spec()).html);
    for (const g of groups) {
      expect(g.mirrored, `leaf ${g.seq}`).toBe(g.role === "right");
      expect(g.turned, `leaf ${g.seq}`).toBe(g.role === "right");
    }
  });

  test("the yield line, the run bracket, the title and the accessible summary", () => {
    const { html } = render(small, spec(), "Flitch FL-TEST-3");
    expect(html).toContain('data-testid="plan-picture"');
    expect(html).toContain('role="img"');
    expect(html).toContain("<title>Flitch FL-TEST-3</title>");
    expect(html).toContain('width="100%"');
    expect(html).toMatch(/viewBox="0 0 \d+ [\d.]+"/);
    expect(html).toContain("Run 1 · pair");
    // 5 of 12 leaves used (4 face + 1 reserve); every leaf here is about the same size.
    expect(html).toMatch(/1 pair · 5 of 12 leaves used \(4 on faces, 1 reserve\) · \d+ % of the flitch&#x27;s area/);
    expect(html).toMatch(/aria-label="Flitch FL-TEST-3: 12 leaves in slicing order\. 1 pair · 5 of 12 leaves used/);
  });

  test("the yield line in the worked form of the brief", () => {
    // 24 leaves of one size, 2 per face, reserve 1; every other leaf from 16 on is unusable.
    const leaves = Array.from({ length: 24 }, (_, i) => leaf(i + 1, { lengthMm: 1000, widthMm: 200, usable: ![16, 18, 20, 22, 24].includes(i + 1) }));
    const { html } = render(leaves, spec({ leavesPerFace: 2, reservePerPair: 1 }));
    // Stretch 1–15: three blocks of 5 → 3 pairs, 15 leaves used (12 face, 3 reserve), area 15/24 = 63 %.
    expect(html).toContain("3 pairs · 15 of 24 leaves used (12 on faces, 3 reserve) · 63 % of the flitch&#x27;s area");
  });

  test("with no pair, it says so plainly", () => {
    const leaves = [leaf(1), leaf(2), leaf(3), leaf(4, { usable: false }), leaf(5), leaf(6, { widthMm: 120 }), leaf(7)];
    const { html, plan } = render(leaves, spec());
    expect(plan.pairs).toBe(0);
    expect(html).toContain("No pair fits: the longest unbroken stretch of good leaves is 3, a pair needs 5 (2 × 2 face leaves + 1 reserve)");
    expect(html).not.toContain("Run 1");
    expect(leafGroups(html).every((g) => !g.mirrored)).toBe(true);
  });

  test("a defect is marked where it was found, or at the centre when its place is unknown", () => {
    const { html } = render([leaf(1, { lengthMm: 1000, usable: false, defects: [{ kind: "knot", positionMm: 250 }] }), leaf(2, { usable: false, defects: [{ kind: "hole", positionMm: null }] })], spec());
    // Where the ✕ sits, as a share of the leaf's length from its butt end (the bottom of the drawn leaf).
    const share = (kind: string) => {
      const d = html.match(new RegExp(`data-defect="${kind}" d="M[\\d.]+ ([\\d.]+)`));
      const body = html.slice(0, d!.index!).split("<g data-seq=").pop()!;
      const rect = body.match(/<rect x="[\d.]+" y="([\d.]+)" width="[\d.]+" height="([\d.]+)"/)!;
      const [top, h] = [Number(rect[1]), Number(rect[2])];
      return (top + h - (Number(d![1]) + 5)) / h;
    };
    expect(share("knot")).toBeCloseTo(0.25, 2);
    expect(share("hole")).toBeCloseTo(0.5, 2);
  });

  test("long flitches wrap into rows of at most 20 leaves", () => {
    const leaves = Array.from({ length: 45 }, (_, i) => leaf(i + 1));
    const { html } = render(leaves, spec());
    expect(leafGroups(html)).toHaveLength(45);
    const xs = [...html.matchAll(/<g data-seq="\d+"[^>]*><title>[^<]*<\/title><text x="([\d.]+)"/g)].map((m) => Number(m[1]));
    const perRow = new Map<number, number>();
    const ys = [...html.matchAll(/<g data-seq="\d+"[^>]*><title>[^<]*<\/title><text x="[\d.]+" y="([\d.]+)"/g)].map((m) => Number(m[1]));
    for (const y of ys) perRow.set(y, (perRow.get(y) ?? 0) + 1);
    expect(xs).toHaveLength(45);
    expect(Math.max(...perRow.values())).toBeLessThanOrEqual(20);
  });
});

/**
 * Book match, as defined by the Architectural Woodwork Standards §1.2.19: "every other leaf turned
 * over, leaves taken in sequence". Slip match (§1.2.20) joins leaves in sequence without turning
 * them; the picture must never show a right face that way.
 */
describe("PlanPicture shows a book match (AWS §1.2.19), never a slip match (§1.2.20)", () => {
  test("for random flitches: left[i] < right[i] < left[i+1], consecutive, and exactly the right faces are turned", () => {
    for (let seed = 1; seed <= 60; seed++) {
      const r = rng(seed);
      const n = 4 + Math.floor(r() * 40);
      const s = spec({ leavesPerFace: 1 + Math.floor(r() * 3), reservePerPair: Math.floor(r() * 3) });
      const leaves = Array.from({ length: n }, (_, i) =>
        leaf(i + 1, {
          usable: r() > 0.12,
          lengthMm: r() < 0.08 ? 800 : 950 + Math.floor(r() * 100),
          takenBy: r() < 0.05 ? "PR-EARLIER" : null,
        }),
      );
      const { html, plan } = render(leaves, s);
      const turned = new Set<number>();
      for (const run of plan.runs) {
        expect(run.left).toHaveLength(s.leavesPerFace);
        expect(run.right).toHaveLength(s.leavesPerFace);
        for (let i = 0; i < run.left.length; i++) {
          expect(run.right[i]).toBe(run.left[i]! + 1);
          if (i + 1 < run.left.length) expect(run.left[i + 1]).toBe(run.right[i]! + 1);
        }
        if (run.reserve.length) expect(run.reserve[0]).toBe(run.right[run.right.length - 1]! + 1);
        for (const seq of run.right) turned.add(seq);
      }
      const groups = leafGroups(html);
      expect(groups.map((g) => g.seq).sort((a, b) => a - b), `seed ${seed}`).toEqual(leaves.map((l) => l.seq));
      for (const g of groups) {
        // Exactly the right-face leaves are drawn turned (mirrored); a right face drawn as cut would be a slip match.
        expect(g.mirrored, `seed ${seed}, leaf ${g.seq}`).toBe(turned.has(g.seq));
        if (g.role === "right") expect(g.mirrored).toBe(true);
        if (g.role === "left") expect(g.mirrored).toBe(false);
      }
    }
  });
});
