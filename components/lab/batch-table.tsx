import Link from "next/link";
import { DataTable } from "@/components/ui/data-table";
import type { listBatches } from "@/lib/lab/units";
import { formatCalendarDay } from "@/lib/format";
import { paths } from "@/lib/paths";
import { UNIT_CLASS_WORDS, UNIT_CLASSES } from "@/lib/lab/unit-counts";
import { PART_TYPE_LABEL } from "@/lib/vocabulary/part-types";

type Batch = Awaited<ReturnType<typeof listBatches>>[number];

export const batchLink = (code: string) => (
  <Link className="serial whitespace-nowrap font-bold text-leaf-dark underline" href={paths.labBatch(code)}>
    {code}
  </Link>
);

/** Which unit classes the table shows: "Other" only when some unit is neither waiting, free, reserved, fitted nor failed. */
function classesOf(batches: Batch[]) {
  return UNIT_CLASSES.filter((c) => c !== "other" || batches.some((b) => b.other > 0));
}

/** What the counts mean, in a sentence above the table. */
export function BatchCountsNote({ batches }: { batches: Batch[] }) {
  return (
    <p className="mb-3 text-sm text-ink-soft">
      Each batch&apos;s units, counted by where they stand now: {classesOf(batches).map((c) => UNIT_CLASS_WORDS[c].sentence).join(", ")}. The counts add up to the units.
    </p>
  );
}

/** Batches with their units counted by where they stand; sorted by when they came in, newest first. */
export function BatchTable({ batches }: { batches: Batch[] }) {
  const classes = classesOf(batches);
  return (
    <DataTable
      caption="Batches of drive units"
      testId="lab-batches"
      empty="No batch registered yet."
      initialSort={{ key: "code", dir: "desc" }}
      columns={[
        { key: "code", label: "Batch" },
        { key: "units", label: "Units", numeric: true },
        ...classes.map((c) => ({ key: c, label: UNIT_CLASS_WORDS[c].column, numeric: true })),
      ]}
      rows={batches.map((b) => ({
        id: b.id,
        cells: {
          // Sorted by when it came in; what and when sit under the code, to leave room for the counts.
          code: {
            value: `${b.receivedOn} ${b.code}`,
            display: (
              <span className="text-sm">
                {batchLink(b.code)}
                <span className="block">
                  <span className="font-bold">{PART_TYPE_LABEL[b.partType]}</span> <span className="whitespace-nowrap">{b.partNumber}</span>
                </span>
                <span className="block whitespace-nowrap text-ink-soft">
                  lot {b.lot} · {formatCalendarDay(b.receivedOn)}
                </span>
              </span>
            ),
          },
          units: { value: b.units },
          ...Object.fromEntries(classes.map((c) => [c, { value: b[c] }])),
        },
      }))}
    />
  );
}
