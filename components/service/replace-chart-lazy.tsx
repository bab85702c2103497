"use client";
import dynamic from "next/dynamic";

/** The candidates' chart, loaded after the page: recharts alone would more than double its first load. */
export const ReplaceChart = dynamic(() => import("./replace-chart").then((m) => m.ReplaceChart), {
  ssr: false,
  loading: () => (
    <div className="flex h-72 w-full items-center justify-center rounded-lg border border-line bg-surface text-sm text-ink-soft" aria-busy="true">
      Drawing the chart…
    </div>
  ),
});
