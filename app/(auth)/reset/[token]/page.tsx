import type { Metadata } from "next";
import Link from "next/link";
import { NewPasswordForm } from "@/components/auth/new-password-form";
import { Notice } from "@/components/ui/notice";
import { getDb } from "@/db";
import { pageParam } from "@/lib/auth/guard";
import { findToken } from "@/lib/users/queries";
import { resetPasswordAction } from "../actions";

export const metadata: Metadata = { title: "Set a new password" };

export default async function ResetTokenPage({ params }: { params: Promise<{ token: string }> }) {
  const token = pageParam((await params).token);
  const found = await findToken(getDb(), token, "reset");
  return (
    <>
      <h1 className="mb-1 text-2xl font-bold">Set a new password</h1>
      {found ? (
        <>
          <p className="mb-6 text-ink-soft">For {found.email}. Every other sign-in of this account ends when you save.</p>
          <NewPasswordForm token={token} action={resetPasswordAction} submitLabel="Save and sign in" />
        </>
      ) : (
        <Notice tone="danger" testId="token-gone" className="mt-4">
          This link has expired or has already been used. <Link href="/reset" className="font-bold underline">Ask for a new one</Link>.
        </Notice>
      )}
    </>
  );
}
