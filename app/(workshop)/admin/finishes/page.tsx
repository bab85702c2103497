import type { Metadata } from "next";
import Link from "next/link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { cutWords } from "@/lib/vocabulary/veneer-cuts";
import { referenceUse } from "@/lib/workshop/finishes-dealers";
import { listFinishes } from "@/lib/workshop/queries";
import { swatchOf } from "@/lib/workshop/finish-words";
import { FinishForm, RetireFinishForm, type FinishValues } from "./finish-forms";

export const metadata: Metadata = { title: "Finishes" };

const BLANK: FinishValues = { id: null, kind: "veneer", code: "", name: "", botanicalName: "", cut: "", colourRef: "", detail: "" };

export default async function FinishesPage({ searchParams }: { searchParams: Promise<{ edit?: string; saved?: string }> }) {
  await requirePage("admin.reference");
  const sp = await searchParams;
  const db = getDb();
  const [rows, use] = await Promise.all([listFinishes(db), referenceUse(db)]);
  const editing = sp.edit ? rows.find((f) => f.code === sp.edit) ?? null : null;
  const used = editing ? use.finishes.get(editing.id) ?? 0 : 0;
  const saved = rows.find((f) => f.code === sp.saved);
  return (
    <div className="flex flex-col gap-6" data-testid="admin-finishes-page">
      <BackLink href={paths.admin}>Administration</BackLink>
      <PageHeader title="Finishes" lead="Veneer species, whose pairs are born at the flitch, and lacquer colours, whose cabinets are paired at assembly. A retired finish is no longer offered to new work; its flitches and pairs keep it." />
      {saved ? <Notice tone="leaf" testId="finish-saved">{saved.name} ({saved.code}) saved.</Notice> : null}
      <DataTable
        caption="Finishes"
        testId="admin-finish-table"
        initialSort={{ key: "kind", dir: "desc" }}
        columns={[
          { key: "code", label: "Code" },
          { key: "kind", label: "Kind" },
          { key: "name", label: "Name" },
          { key: "detail", label: "Botanical name and cut, or colour", sortable: false },
          { key: "items", label: "Flitches, leaves and cabinets", numeric: true },
          { key: "state", label: "In use" },
          { key: "edit", label: "", sortable: false },
        ]}
        rows={rows.map((f) => {
          const swatch = swatchOf(f.colourRef);
          return {
            id: f.id,
            cells: {
              code: { value: f.code, display: <span className="serial font-bold">{f.code}</span> },
              kind: { value: f.kind, display: f.kind === "veneer" ? "veneer species" : "lacquer colour" },
              name: { value: f.name },
              detail: {
                value: null,
                display:
                  f.kind === "veneer" ? (
                    <span>
                      <i>{f.botanicalName || "—"}</i>
                      {cutWords(f.cut) ? `, ${cutWords(f.cut)}` : ""}
                      {f.detail ? <span className="text-ink-soft">, {f.detail}</span> : null}
                    </span>
                  ) : (
                    <span className="inline-flex items-center gap-2">
                      {swatch ? <span aria-hidden className="inline-block size-5 rounded border border-line-strong" style={{ backgroundColor: swatch }} /> : null}
                      <span className="font-mono text-sm">{f.colourRef || "—"}</span>
                      {f.detail ? <span className="text-ink-soft">{f.detail}</span> : null}
                    </span>
                  ),
              },
              items: { value: use.finishes.get(f.id) ?? 0 },
              state: { value: f.active ? "in use" : "retired", display: f.active ? <Badge tone="leaf">in use</Badge> : <Badge>retired</Badge> },
              edit: {
                value: null,
                display: (
                  <Link href={`${paths.adminFinishes}?edit=${encodeURIComponent(f.code)}#edit`} className="text-leaf-dark underline" data-testid={`edit-finish-${f.code}`}>
                    Edit
                  </Link>
                ),
              },
            },
          };
        })}
      />
      <div id="edit">
        <Panel title={editing ? `Edit ${editing.name}` : "Add a finish"}>
          <FinishForm
            key={editing?.id ?? "new"}
            initial={editing ? { id: editing.id, kind: editing.kind, code: editing.code, name: editing.name, botanicalName: editing.botanicalName, cut: editing.cut, colourRef: editing.colourRef, detail: editing.detail } : BLANK}
            codeFixed={editing && used > 0 ? `${used} items carry ${editing.code}, so its code and kind stay.` : null}
          />
        </Panel>
      </div>
      {editing ? (
        <Panel title={editing.active ? `Retire ${editing.name}` : `Bring ${editing.name} back`}>
          <RetireFinishForm finishId={editing.id} name={editing.name} active={editing.active} />
        </Panel>
      ) : null}
    </div>
  );
}
