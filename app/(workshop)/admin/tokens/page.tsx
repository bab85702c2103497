import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { displayPrefix, listMachineTokens } from "@/lib/auth/machine-tokens";
import { formatWhen } from "@/lib/format";
import { CreateTokenForm, RevokeTokenDialog } from "./token-forms";

export const metadata: Metadata = { title: "Machine tokens" };

const SCOPE_LABELS = { lab: "Lab endpoints" } as const;

export default async function TokensPage() {
  await requirePage("admin.tokens");
  const tokens = await listMachineTokens(getDb());
  return (
    <div className="flex flex-col gap-6">
      <BackLink href="/admin">Administration</BackLink>
      <PageHeader
        title="Machine tokens"
        lead="Test benches post their measurements to Twinleaf's JSON API with a token of their own. Twinleaf stores only a fingerprint of each token; revoking one shuts its bench out at once."
      />
      <Panel title="Make a token">
        <CreateTokenForm />
      </Panel>
      <Panel title="Tokens">
        <DataTable
          caption="Machine tokens"
          testId="token-table"
          empty="No tokens yet."
          initialSort={{ key: "created", dir: "desc" }}
          columns={[
            { key: "name", label: "Name" },
            { key: "prefix", label: "Starts with" },
            { key: "scope", label: "Reaches" },
            { key: "created", label: "Made" },
            { key: "state", label: "State" },
            { key: "revoke", label: "Revoke", sortable: false },
          ]}
          rows={tokens.map((t) => ({
            id: t.id,
            cells: {
              name: { value: t.name, display: <span className="font-bold">{t.name}</span> },
              prefix: { value: t.prefix, display: <code className="font-mono text-sm">{displayPrefix(t.prefix)}</code> },
              scope: { value: t.scope, display: SCOPE_LABELS[t.scope] },
              created: {
                value: t.createdAt.getTime(),
                display: (
                  <span>
                    <time className="whitespace-nowrap" dateTime={t.createdAt.toISOString()}>{formatWhen(t.createdAt)}</time>
                    <span className="block text-sm text-ink-soft">by {t.createdByName ?? "Twinleaf"}</span>
                  </span>
                ),
              },
              state: t.revokedAt
                ? {
                    value: `revoked ${t.revokedAt.toISOString()}`,
                    display: (
                      <span>
                        <Badge tone="neutral">revoked</Badge>
                        <span className="block text-sm text-ink-soft">
                          <time dateTime={t.revokedAt.toISOString()}>{formatWhen(t.revokedAt)}</time> by {t.revokedByName ?? "Twinleaf"}
                        </span>
                      </span>
                    ),
                  }
                : { value: "active", display: <Badge tone="leaf">active</Badge> },
              revoke: { value: null, display: <RevokeTokenDialog tokenId={t.id} name={t.name} revoked={t.revokedAt !== null} /> },
            },
          }))}
        />
      </Panel>
    </div>
  );
}
