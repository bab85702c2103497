import type { Metadata } from "next";
import { NewPasswordForm } from "@/components/auth/new-password-form";
import { Notice } from "@/components/ui/notice";
import { getDb } from "@/db";
import { pageParam } from "@/lib/auth/guard";
import { findToken } from "@/lib/users/queries";
import { acceptInviteAction } from "./actions";

export const metadata: Metadata = { title: "Join the register" };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const token = pageParam((await params).token);
  const found = await findToken(getDb(), token, "invite");
  return (
    <>
      <h1 className="mb-1 text-2xl font-bold">Welcome{found ? `, ${found.name}` : ""}</h1>
      {found ? (
        <>
          <p className="mb-6 text-ink-soft">Choose a password for {found.email}. This link works once.</p>
          <NewPasswordForm token={token} action={acceptInviteAction} submitLabel="Set password and sign in" />
        </>
      ) : (
        <Notice tone="danger" testId="token-gone" className="mt-4">
          This invitation has expired or has already been used. Ask your administrator to send a new one.
        </Notice>
      )}
    </>
  );
}
