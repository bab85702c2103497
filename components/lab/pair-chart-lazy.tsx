"use client";
import dynamic from "next/dynamic";

/** The pair chart, loaded after the page: recharts alone would more than double its first load. */
export const PairChart = dynamic(() => import("./pair-chart").then((m) => m.PairChart), {
  ssr: false,
  loading: () => (
    <div className="flex h-64 w-full items-center justify-center rounded-lg border border-line bg-surface text-sm text-ink-soft" aria-busy="true">
      Drawing the chart…
    </div>
  ),
});
