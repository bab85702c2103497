import type { Metadata } from "next";
import { Notice } from "@/components/ui/notice";
import { getDb } from "@/db";
import { pageParam } from "@/lib/auth/guard";
import { findPendingRegistration, REGISTRATION_LINK_GONE } from "@/lib/owners/registrations";
import { ConfirmRegistrationForm } from "./confirm-form";

export const metadata: Metadata = { title: "Confirm your registration" };

/**
 * Where the confirmation link in an owner's mail lands. Opening it changes nothing (mail scanners
 * open links too); the button does. A forged, used or expired link gets a plain page.
 */
export default async function ConfirmRegistrationPage({ params }: { params: Promise<{ token: string }> }) {
  const token = pageParam((await params).token);
  const found = await findPendingRegistration(getDb(), token);
  return (
    <article className="flex flex-col gap-4">
      <h1 className="text-2xl font-bold">Confirm your registration</h1>
      {found ? (
        <>
          <p className="text-ink-soft" data-testid="registration-pending">
            {found.name}, press the button to register as an owner of pair <span className="serial font-bold">{found.pair}</span> with {found.email}.
            {found.consent ? " You asked for recall notices and service mail about it." : ""}
          </p>
          <ConfirmRegistrationForm token={token} />
        </>
      ) : (
        <Notice tone="danger" testId="registration-link-gone">
          {REGISTRATION_LINK_GONE}
        </Notice>
      )}
    </article>
  );
}
