"use client";
import { useRouter } from "next/navigation";
import { useMemo } from "react";
import Tree, { type CustomNodeElementProps, type RawNodeDatum } from "react-d3-tree";
import { positionWords } from "@/lib/events/describe";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { itemHref } from "@/lib/paths";
import type { TraceTree } from "@/lib/genealogy/trace";

const KIND_COLOUR: Record<string, string> = {
  pair: "#1f4b3e", speaker: "#2e6a57", cabinet: "#7b4f32", leaf: "#a0714d", flitch: "#7b4f32",
  drive_unit: "#2b5785", crossover: "#5a4e8a", component_lot: "#7d5200", carton: "#4f585c", shipment: "#1d2326",
};

function toDatum(n: TraceTree, holderKind: string | null = null): RawNodeDatum {
  return {
    name: n.identity,
    attributes: { kind: stateLabel(n.kind), position: n.position ? positionWords(holderKind, n.position) : "", ended: n.endedAt ? "removed" : "" },
    children: n.children.map((c) => toDatum(c, n.kind)),
  };
}

/** The trace as a tree you can fold: click a node's dot to fold it, its name to open it. */
export function TraceTreePicture({ tree, height = 520 }: { tree: TraceTree; height?: number }) {
  const router = useRouter();
  const data = useMemo(() => toDatum(tree), [tree]);
  const renderNode = ({ nodeDatum, toggleNode }: CustomNodeElementProps) => {
    const kind = String(nodeDatum.attributes?.kind ?? "");
    const removed = nodeDatum.attributes?.ended === "removed";
    return (
      <g>
        <circle
          r={9}
          fill={nodeDatum.__rd3t.collapsed ? "#fffdf8" : (KIND_COLOUR[kind.replace(/ /g, "_")] ?? "#4f585c")}
          stroke={KIND_COLOUR[kind.replace(/ /g, "_")] ?? "#4f585c"}
          strokeWidth={3}
          onClick={toggleNode}
          style={{ cursor: "pointer" }}
        >
          <title>{nodeDatum.__rd3t.collapsed ? "Unfold" : "Fold"}</title>
        </circle>
        <text
          x={16}
          y={-4}
          style={{ fontFamily: "var(--font-serial)", fontSize: 13, fill: removed ? "#a0372a" : "#1d2326", cursor: "pointer", textDecoration: removed ? "line-through" : undefined }}
          strokeWidth={0}
          onClick={() => router.push(itemHref(nodeDatum.name))}
        >
          {nodeDatum.name}
        </text>
        <text x={16} y={13} strokeWidth={0} style={{ fontFamily: "var(--font-text)", fontSize: 12, fill: "#4f585c" }}>
          {[nodeDatum.attributes?.position, kind, removed ? "removed" : ""].filter(Boolean).join(" · ")}
        </text>
      </g>
    );
  };
  return (
    <div style={{ height }} className="w-full overflow-hidden rounded-lg border border-line bg-paper" data-testid="trace-tree">
      <Tree
        data={data}
        orientation="horizontal"
        collapsible
        initialDepth={1}
        nodeSize={{ x: 250, y: 46 }}
        separation={{ siblings: 1, nonSiblings: 1.3 }}
        translate={{ x: 40, y: height / 2 }}
        pathFunc="step"
        renderCustomNodeElement={renderNode}
        zoomable
      />
    </div>
  );
}
