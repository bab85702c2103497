import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SerialText } from "@/components/register/serial-text";
import { BackLink } from "@/components/ui/back-link";
import { Panel, PageHeader } from "@/components/ui/panel";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { readMailConfig } from "@/lib/mail/config";
import { attachmentTypeWords, isMessageId, readMessage, type MailboxAttachment } from "@/lib/mail/mailbox";
import { paths } from "@/lib/paths";
import { formatSize } from "@/lib/uploads";

export const metadata: Metadata = { title: "Caught message" };

/** Plain text with its web addresses and serials made clickable (the demo's invite and reset links, a shipment's pairs). */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <pre className="whitespace-pre-wrap break-words font-sans" data-testid="mail-text">
      {parts.map((p, i) =>
        /^https?:\/\//.test(p) ? (
          <a key={i} href={p} className="font-bold text-leaf-dark underline">
            {p}
          </a>
        ) : (
          <SerialText key={i} text={p} />
        ),
      )}
    </pre>
  );
}

const attachmentHref = (id: string, a: MailboxAttachment) => `/api/v1/admin/mail/${encodeURIComponent(id)}/attachments/${a.index}`;

function Attachments({ id, list }: { id: string; list: MailboxAttachment[] }) {
  if (list.length === 0) return <p className="text-ink-soft">This message has no attachments.</p>;
  return (
    <ul className="flex flex-col gap-2" data-testid="mail-attachments">
      {list.map((a) => (
        <li key={a.index} className="flex flex-wrap items-center gap-x-4 gap-y-1 rounded-lg border border-line px-3 py-2" data-testid="mail-attachment">
          <span className="font-bold whitespace-nowrap">{a.filename}</span>
          <span className="text-sm text-ink-soft">
            {attachmentTypeWords(a.contentType)} · {formatSize(a.size)}
          </span>
          <a href={attachmentHref(id, a)} download={a.filename} className="ml-auto inline-flex min-h-12 items-center font-bold text-leaf-dark underline underline-offset-4" aria-label={`Download ${a.filename}`}>
            Download
          </a>
        </li>
      ))}
    </ul>
  );
}

export default async function CaughtMessagePage({ params }: { params: Promise<{ id: string }> }) {
  await requirePage("admin.mail");
  const { id: raw } = await params;
  const id = pageParam(raw);
  if (!isMessageId(id)) notFound();
  const message = await readMessage(readMailConfig().mailboxDir, id);
  if (!message) notFound();
  return (
    <div className="flex flex-col gap-6">
      <BackLink href={paths.adminMail}>All mail</BackLink>
      <PageHeader title={message.subject || "(no subject)"} lead={`From ${message.from} to ${message.to}`} />
      <Panel>
        <Linkified text={message.text} />
      </Panel>
      <Panel title={`Attachments (${message.attachments.length})`}>
        <Attachments id={message.id} list={message.attachments} />
      </Panel>
    </div>
  );
}
