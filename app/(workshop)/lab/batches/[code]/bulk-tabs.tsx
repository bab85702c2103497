"use client";
import { useState } from "react";
import { cx } from "@/components/ui/cx";
import { ResponseUpload } from "@/components/lab/response-upload";
import { TsCsvImport } from "./bulk-measurements";

/** Response files or a parameters CSV for the whole batch, one at a time. */
export function BulkTabs({ batch }: { batch: string }) {
  const [tab, setTab] = useState<"files" | "csv">("files");
  const tabs = [
    { key: "files" as const, label: "Response files" },
    { key: "csv" as const, label: "Thiele–Small CSV" },
  ];
  return (
    <div>
      <div role="tablist" aria-label="What to bring in" className="mb-4 flex gap-2">
        {tabs.map((t) => (
          <button key={t.key} role="tab" type="button" aria-selected={tab === t.key} aria-controls={`bulk-${t.key}`} id={`bulk-tab-${t.key}`} onClick={() => setTab(t.key)} className={cx("min-h-12 rounded-lg border px-4 font-bold", tab === t.key ? "border-leaf bg-leaf-soft text-leaf-dark" : "border-line bg-surface")}>
            {t.label}
          </button>
        ))}
      </div>
      <div role="tabpanel" id={`bulk-${tab}`} aria-labelledby={`bulk-tab-${tab}`}>
        {tab === "files" ? <ResponseUpload batch={batch} /> : <TsCsvImport batch={batch} />}
      </div>
    </div>
  );
}
