import type { Metadata } from "next";
import Link from "next/link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { paths } from "@/lib/paths";
import { modelsForAdmin } from "@/lib/workshop/models";

export const metadata: Metadata = { title: "Models" };

export default async function ModelsPage() {
  await requirePage("admin.reference");
  const rows = await modelsForAdmin(getDb());
  return (
    <div className="flex flex-col gap-6" data-testid="admin-models-page">
      <BackLink href={paths.admin}>Administration</BackLink>
      <PageHeader
        title="Models"
        lead="Each speaker design with its positions, limits, GTIN, warranty and packing list. A change is saved as a new version; pairs already started keep the version they started under."
        actions={
          <Link href={paths.adminNewModel} className={buttonClasses("primary", "sm")} data-testid="new-model">
            Add a model
          </Link>
        }
      />
      <DataTable
        caption="Models"
        testId="admin-model-table"
        initialSort={{ key: "code", dir: "asc" }}
        columns={[
          { key: "code", label: "Code" },
          { key: "name", label: "Model" },
          { key: "version", label: "Version", numeric: true },
          { key: "saved", label: "Saved" },
          { key: "positions", label: "Drive-unit positions", numeric: true },
          { key: "trim", label: "Trim positions", numeric: true },
          { key: "warranty", label: "Warranty", numeric: true },
          { key: "items", label: "Pairs, cabinets and trim parts", numeric: true },
          { key: "state", label: "In use" },
        ]}
        rows={rows.map((m) => ({
          id: m.id,
          cells: {
            code: {
              value: m.code,
              display: (
                <Link href={paths.adminModel(m.code)} className="serial font-bold text-leaf-dark underline" data-testid={`model-link-${m.code}`}>
                  {m.code}
                </Link>
              ),
            },
            name: { value: m.name },
            version: { value: m.version },
            saved: { value: m.savedAt ? m.savedAt.getTime() : null, display: m.savedAt ? <time dateTime={m.savedAt.toISOString()}>{formatDate(m.savedAt)}</time> : "—" },
            positions: { value: m.positions },
            trim: { value: m.trimPositions },
            warranty: { value: m.warrantyMonths, display: `${m.warrantyMonths} months` },
            items: { value: m.items },
            state: { value: m.active ? "in use" : "retired", display: m.active ? <Badge tone="leaf">in use</Badge> : <Badge>retired</Badge> },
          },
        }))}
      />
    </div>
  );
}
