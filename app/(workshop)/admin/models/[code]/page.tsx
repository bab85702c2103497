import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { TD, TH, TR, Table } from "@/components/ui/table";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDate, formatWhenExact } from "@/lib/format";
import { paths } from "@/lib/paths";
import { modelPage } from "@/lib/workshop/models";
import { ModelForm } from "../model-form";
import { RetireModelForm } from "../retire-form";

export async function generateMetadata({ params }: { params: Promise<{ code: string }> }): Promise<Metadata> {
  const { code } = await params;
  return { title: `Model ${decodeURIComponent(code)}` };
}

const itemsText = (n: number) => (n === 1 ? "1 pair, cabinet or trim part" : `${n} pairs, cabinets and trim parts`);

export default async function ModelPage({ params, searchParams }: { params: Promise<{ code: string }>; searchParams: Promise<{ saved?: string }> }) {
  await requirePage("admin.reference");
  const code = pageParam((await params).code);
  const found = await modelPage(getDb(), code);
  if (!found) notFound();
  const { spec, history, itemsUsing } = found;
  const { id, version, active, ...plain } = spec;
  const saved = Number((await searchParams).saved);
  const codeFixed = itemsUsing > 0 ? `${itemsUsing} serials carry ${spec.code}, so the code stays.` : null;

  return (
    <div className="flex flex-col gap-6" data-testid="admin-model-page">
      <BackLink href={paths.adminModels}>Models</BackLink>
      <PageHeader
        title={
          <>
            {spec.name} <span className="serial text-ink-soft">{spec.code}</span>
          </>
        }
        lead={
          <>
            Version {version || 1}. {active ? "In use for new work." : "Retired: new work does not offer it; its pairs and history stay."}
          </>
        }
        actions={
          <Link href={`${paths.adminRoutes}/${encodeURIComponent(spec.code)}/edit`} className={buttonClasses("secondary", "sm")}>
            Its cabinet route
          </Link>
        }
      />
      {history.some((h) => h.version === saved) ? (
        <Notice tone="leaf" testId="model-saved">
          Version {saved} of {spec.code} saved. Pairs already started keep the version they started under.
        </Notice>
      ) : null}
      {!active ? <Badge>retired</Badge> : null}

      <Panel title="Edit as a new version">
        {/* Keyed by version so a saved form opens fresh on the new version. */}
        <ModelForm key={version} initial={plain} modelId={id} version={version} codeFixed={codeFixed} />
      </Panel>

      <Panel title="Versions">
        <Table data-testid="model-history">
          <caption className="sr-only">Versions of {spec.code}, newest first</caption>
          <thead>
            <tr>
              <TH className="text-right">Version</TH>
              <TH>Saved</TH>
              <TH>By</TH>
              <TH>What changed</TH>
              <TH>Why</TH>
              <TH className="text-right">Made under it</TH>
            </tr>
          </thead>
          <tbody>
            {history.map((h) => (
              <TR key={h.version} data-testid={`model-version-${h.version}`}>
                <TD className="text-right tabular-nums">{h.version}</TD>
                <TD>
                  <time dateTime={h.at.toISOString()} title={formatWhenExact(h.at)}>
                    {formatDate(h.at)}
                  </time>
                </TD>
                <TD>{h.by ?? "Twinleaf"}</TD>
                <TD>{h.version === 1 ? "first version" : h.changed.length ? h.changed.join(", ") : "—"}</TD>
                <TD>{h.note || <span className="text-ink-soft">—</span>}</TD>
                <TD className="text-right">{itemsText(h.items)}</TD>
              </TR>
            ))}
          </tbody>
        </Table>
      </Panel>

      <Panel title={active ? "Retire" : "Bring back into use"}>
        <RetireModelForm modelId={id} code={spec.code} active={active} />
      </Panel>
    </div>
  );
}
