import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { Fragment } from "react";
import { BackLink } from "@/components/ui/back-link";
import { Panel, PageHeader } from "@/components/ui/panel";
import { requirePage } from "@/lib/auth/guard";
import { readMailConfig } from "@/lib/mail/config";
import { readMessage } from "@/lib/mail/mailbox";

export const metadata: Metadata = { title: "Caught message" };

/** Plain text with its web addresses made clickable (the demo's invite and reset links). */
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
          <Fragment key={i}>{p}</Fragment>
        ),
      )}
    </pre>
  );
}

export default async function CaughtMessagePage({ params }: { params: Promise<{ id: string }> }) {
  await requirePage("admin.mail");
  const { id } = await params;
  const message = await readMessage(readMailConfig().mailboxDir, decodeURIComponent(id)).catch(() => null);
  if (!message) notFound();
  return (
    <div className="flex flex-col gap-6">
      <BackLink href="/admin/mail">All mail</BackLink>
      <PageHeader title={message.subject || "(no subject)"} lead={`From ${message.from} to ${message.to}`} />
      <Panel>
        <Linkified text={message.text} />
      </Panel>
    </div>
  );
}
