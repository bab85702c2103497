import { positionWords } from "@/lib/events/describe";
import type { TraceTree } from "@/lib/genealogy/trace";
import { BATCH_POSITION, FLITCH_POSITION, MAKER_LOT_POSITION } from "@/lib/vocabulary/positions";
import { SerialLink } from "./serial-link";

// What a part came from (its batch and the maker's lot, a leaf's flitch) reads on the part's own
// line, so the tree does not grow two levels deeper for every drive unit on a phone.
const SOURCE_POSITIONS: readonly string[] = [BATCH_POSITION, MAKER_LOT_POSITION, FLITCH_POSITION];
const isSource = (c: TraceTree) => SOURCE_POSITIONS.includes(c.position ?? "");

function Sources({ node }: { node: TraceTree }) {
  return node.children.filter(isSource).map((c) => (
    <span key={`${c.id}-${c.linkId}`} className="text-sm text-ink-soft">
      {" · "}
      {positionWords(node.kind, c.position ?? "")} <SerialLink identity={c.identity} bold={false} className="text-sm" />
      <Sources node={c} />
    </span>
  ));
}

function Parts({ node }: { node: TraceTree }) {
  const parts = node.children.filter((c) => !isSource(c));
  if (!parts.length) return null;
  return (
    <ul className="ml-4 border-l border-line pl-3">
      {parts.map((c) => (
        <li key={`${c.id}-${c.linkId}`} className="py-0.5">
          <span className="inline-block min-w-10 text-sm font-bold text-ink-soft">{positionWords(node.kind, c.position ?? "")}</span>{" "}
          <SerialLink identity={c.identity} bold={false} className="text-sm" />
          <Sources node={c} />
          <Parts node={c} />
        </li>
      ))}
    </ul>
  );
}

/**
 * A pair's two halves side by side, left and right, each with the parts inside it: its speakers
 * once assembled, its two cabinets (positions CAB-L and CAB-R) before that.
 */
export function PairHalves({ tree }: { tree: TraceTree }) {
  const sides = ["L", "R"].map((side) => tree.children.find((c) => c.position === side) ?? tree.children.find((c) => c.position === `CAB-${side}`));
  return (
    <div className="mb-4 grid gap-4 md:grid-cols-2" data-testid="pair-halves">
      {sides.map((s, i) => (
        <div key={i} className="min-w-0 overflow-x-auto rounded-lg border border-line bg-paper p-3">
          <p className="font-bold">{i === 0 ? "Left" : "Right"}</p>
          {s ? (
            <>
              <SerialLink identity={s.identity} />
              <Parts node={s} />
            </>
          ) : (
            <p className="text-ink-soft">Nothing at this side: the pair is one short.</p>
          )}
        </div>
      ))}
    </div>
  );
}
