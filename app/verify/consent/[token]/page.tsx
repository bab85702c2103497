import type { Metadata } from "next";
import { Notice } from "@/components/ui/notice";
import { getDb } from "@/db";
import { pageParam } from "@/lib/auth/guard";
import { CONSENT_LINK_GONE, findConsentLink } from "@/lib/owners/registrations";
import { WithdrawConsentForm } from "./withdraw-form";

export const metadata: Metadata = { title: "Stop recall notices and service mail" };

/** Where the withdrawal link in a message to an owner lands: the button withdraws, opening the page does not. */
export default async function WithdrawConsentPage({ params }: { params: Promise<{ token: string }> }) {
  const token = pageParam((await params).token);
  const found = await findConsentLink(getDb(), token);
  return (
    <article className="flex flex-col gap-4">
      <h1 className="text-2xl font-bold">Stop recall notices and service mail</h1>
      {found ? (
        <>
          <p className="text-ink-soft" data-testid="consent-pending">
            {found.name ? `${found.name}, press` : "Press"} the button and the workshop will no longer send you recall notices or service mail. You can give your consent again by telling the service desk.
          </p>
          <WithdrawConsentForm token={token} />
        </>
      ) : (
        <Notice tone="danger" testId="consent-link-gone">
          {CONSENT_LINK_GONE}
        </Notice>
      )}
    </article>
  );
}
