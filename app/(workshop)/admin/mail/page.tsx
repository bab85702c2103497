import type { Metadata } from "next";
import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { readMailConfig } from "@/lib/mail/config";
import { attachmentTypeWords, readMailbox } from "@/lib/mail/mailbox";
import { listOutbox } from "@/lib/mail/outbox";
import { formatWhen, formatWhenExact } from "@/lib/format";
import { paths } from "@/lib/paths";
import { formatSize } from "@/lib/uploads";

export const metadata: Metadata = { title: "Mail" };

const TONE = { sent: "leaf", pending: "caution", failed: "danger" } as const;

/** File names whole, one a line (a certificate's name holds a serial, which never breaks). */
function FileNames({ names, details }: { names: string[]; details?: string[] }) {
  return (
    <ul className="text-sm">
      {names.map((n, i) => (
        <li key={`${n}-${i}`}>
          <span className="whitespace-nowrap">{n}</span>
          {details?.[i] ? <span className="text-ink-soft"> ({details[i]})</span> : null}
        </li>
      ))}
    </ul>
  );
}

export default async function MailPage() {
  await requirePage("admin.mail");
  const config = readMailConfig();
  const [outbox, caught] = await Promise.all([listOutbox(getDb(), { limit: 100 }), readMailbox(config.mailboxDir, { limit: 100 })]);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Mail" lead="Every message is queued together with the event that caused it and sent by a background sender that retries, so a failed send loses nothing." />
      <Panel title="Queued and sent">
        <DataTable
          caption="Outgoing mail"
          testId="outbox-table"
          initialSort={{ key: "queued", dir: "desc" }}
          columns={[
            { key: "queued", label: "Queued" },
            { key: "to", label: "To" },
            { key: "subject", label: "Subject" },
            { key: "files", label: "Attachments" },
            { key: "status", label: "Status" },
            { key: "attempts", label: "Tries", numeric: true },
            { key: "note", label: "Last problem" },
          ]}
          rows={outbox.map((m) => ({
            id: String(m.id),
            cells: {
              queued: { value: m.createdAt.getTime(), display: <span className="whitespace-nowrap">{formatWhen(m.createdAt)}</span> },
              to: { value: m.to },
              subject: { value: m.subject },
              files: { value: m.attachments.join(", "), display: m.attachments.length ? <FileNames names={m.attachments} /> : <span className="text-ink-soft">none</span> },
              status: { value: m.status, display: <Badge tone={TONE[m.status]}>{m.status === "pending" && m.nextAttemptAt ? `retry ${formatWhenExact(m.nextAttemptAt)}` : m.status}</Badge> },
              attempts: { value: m.attempts },
              note: { value: m.lastError ?? "" },
            },
          }))}
        />
      </Panel>
      <Panel title="Caught by the demo's mail server">
        <p className="mb-4 text-ink-soft">
          The demo runs a local stand-in SMTP server that keeps every message it receives in <code className="break-all font-mono">{config.mailboxDir}</code> instead of delivering it. With a real SMTP server configured, this list stays empty.
        </p>
        <DataTable
          caption="Caught mail"
          testId="mailbox-table"
          initialSort={{ key: "received", dir: "desc" }}
          empty="No mail caught."
          columns={[
            { key: "received", label: "Received" },
            { key: "to", label: "To" },
            { key: "subject", label: "Subject" },
            { key: "attachments", label: "Attachments" },
          ]}
          rows={caught.map((m) => ({
            id: m.id,
            cells: {
              received: { value: m.receivedAt.getTime(), display: formatWhenExact(m.receivedAt) },
              to: { value: m.to },
              subject: { value: m.subject, display: <Link className="font-bold text-leaf-dark underline underline-offset-4" href={`${paths.adminMail}/${encodeURIComponent(m.id)}`}>{m.subject || "(no subject)"}</Link> },
              attachments: {
                value: m.attachments.length,
                display: m.attachments.length ? (
                  <FileNames names={m.attachments.map((a) => a.filename)} details={m.attachments.map((a) => `${attachmentTypeWords(a.contentType)}, ${formatSize(a.size)}`)} />
                ) : (
                  <span className="text-ink-soft">none</span>
                ),
              },
            },
          }))}
        />
      </Panel>
    </div>
  );
}
