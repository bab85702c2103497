"use client";
import dynamic from "next/dynamic";

/**
 * The trace tree, loaded after the page: react-d3-tree and its d3 modules are the heaviest part of
 * the item page, and a tablet on the shop floor should show the serial and its facts first.
 */
export const TraceTreePicture = dynamic(() => import("./trace-tree").then((m) => m.TraceTreePicture), {
  ssr: false,
  loading: () => (
    <div style={{ height: 520 }} className="flex w-full items-center justify-center rounded-lg border border-line bg-paper text-ink-soft" aria-busy="true">
      Drawing the tree…
    </div>
  ),
});
