import Link from "next/link";
import { paths } from "@/lib/paths";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import type { Dealer, Finish } from "@/db/schema";
import type { ModelSummary } from "@/lib/workshop/queries";
import { isPartType, PART_TYPE_LABEL } from "@/lib/vocabulary/part-types";
import { positionName } from "@/lib/vocabulary/positions";
import { finishDetail, swatchOf } from "@/lib/workshop/finish-words";


/** Models, with the columns a station needs: veneer (leaf needs), tolerances (matching), or all. */
export function ModelTable({ models, show = "all" }: { models: ModelSummary[]; show?: "all" | "veneer" | "tolerances" }) {
  const base = [
    { key: "code", label: "Code" },
    { key: "name", label: "Model" },
  ];
  const veneer = [
    { key: "leaves", label: "Leaves per face", numeric: true },
    { key: "leafSize", label: "Smallest leaf (mm)", sortable: false },
  ];
  const tolerances = [
    { key: "limits", label: "Drive-unit limit", sortable: false },
    { key: "pairLimit", label: "Finished pair limit", numeric: true },
  ];
  const units = { key: "positions", label: "Drive units", sortable: false };
  const gtin = { key: "gtin", label: "Pair GTIN" };
  const columns = [...base, ...(show === "veneer" ? veneer : show === "tolerances" ? [units, ...tolerances] : [units, ...veneer, ...tolerances, gtin])];
  return (
    <DataTable
      caption="Models"
      testId="model-table"
      initialSort={{ key: "code", dir: "asc" }}
      columns={columns}
      rows={models.map((m) => ({
        id: m.id,
        cells: {
          code: { value: m.code, display: <span className="serial font-bold">{m.code}</span> },
          name: { value: m.name, display: <>{m.name}{m.active ? null : <Badge className="ml-2">retired</Badge>}</> },
          positions: {
            value: null,
            display: (
              <ul className="text-sm">
                {m.positions.map((p) => (
                  <li key={p.position} className="whitespace-nowrap">
                    {p.count > 1 ? `${p.count} × ` : ""}
                    {positionName(p.position)}
                  </li>
                ))}
              </ul>
            ),
          },
          leaves: { value: m.leavesPerFace },
          leafSize: { value: null, display: <span className="whitespace-nowrap">{m.minLeafLengthMm} × {m.minLeafWidthMm}</span> },
          limits: {
            value: null,
            display: (
              <ul className="text-sm">
                {m.tolerances.map((t) => (
                  <li key={t.partType} className="whitespace-nowrap">
                    {isPartType(t.partType) ? PART_TYPE_LABEL[t.partType] : t.partType} ±{t.mismatchLimitDb} dB
                  </li>
                ))}
              </ul>
            ),
          },
          pairLimit: {
            value: m.pairResponseLimitDb,
            display: (
              <span className="text-sm">
                <span className="whitespace-nowrap">±{m.pairResponseLimitDb} dB</span>{" "}
                <span className="whitespace-nowrap text-ink-soft">{m.responseMinHz}–{m.responseMaxHz} Hz</span>
              </span>
            ),
          },
          gtin: { value: m.pairGtin, display: <span className="serial text-sm">{m.pairGtin}</span> },
        },
      }))}
    />
  );
}

export function FinishTable({ finishes }: { finishes: Finish[] }) {
  return (
    <DataTable
      caption="Finishes"
      testId="finish-table"
      columns={[
        { key: "code", label: "Code" },
        { key: "name", label: "Finish" },
        { key: "kind", label: "Kind" },
        { key: "detail", label: "Botanical name and cut, or colour" },
      ]}
      rows={finishes.map((f) => ({
        id: f.id,
        cells: {
          code: { value: f.code, display: <span className="serial">{f.code}</span> },
          name: { value: f.name },
          kind: { value: f.kind, display: <Badge tone={f.kind === "veneer" ? "walnut" : "info"}>{f.kind === "veneer" ? "veneer: paired at the flitch" : "lacquer: paired at assembly"}</Badge> },
          detail: {
            value: finishDetail(f),
            display:
              f.kind === "veneer" ? (
                <span>
                  <i>{f.botanicalName}</i>
                  {finishDetail({ ...f, botanicalName: "" }) ? `, ${finishDetail({ ...f, botanicalName: "" })}` : ""}
                </span>
              ) : (
                <span className="inline-flex items-center gap-2">
                  {swatchOf(f.colourRef) ? <span aria-hidden className="inline-block size-4 rounded border border-line-strong" style={{ backgroundColor: swatchOf(f.colourRef)! }} /> : null}
                  {finishDetail(f)}
                </span>
              ),
          },
        },
      }))}
    />
  );
}

/** Dealers, by name unless `sorted` says the rows come in an order of their own (the most recent first, say). */
export function DealerTable({ dealers, sorted = "by name" }: { dealers: Dealer[]; sorted?: "by name" | "as given" }) {
  return (
    <DataTable
      caption="Dealers"
      testId="dealer-table"
      initialSort={sorted === "by name" ? { key: "name", dir: "asc" } : undefined}
      columns={[
        { key: "code", label: "Code" },
        { key: "name", label: "Dealer" },
        { key: "address", label: "Address", sortable: false },
        { key: "city", label: "Town" },
        { key: "country", label: "Country" },
        { key: "email", label: "E-mail" },
      ]}
      rows={dealers.map((d) => ({
        id: d.id,
        cells: {
          code: { value: d.code, display: <span className="serial">{d.code}</span> },
          name: { value: d.name, display: <Link className="font-bold text-leaf-dark underline underline-offset-4" href={paths.dealer(d.code)}>{d.name}</Link> },
          address: { value: null, display: <span className="whitespace-pre-line text-sm">{[d.address, d.postcode].filter(Boolean).join("\n")}</span> },
          city: { value: d.city },
          country: { value: d.country },
          email: { value: d.email },
        },
      }))}
    />
  );
}
