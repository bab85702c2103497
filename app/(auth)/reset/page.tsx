import type { Metadata } from "next";
import Link from "next/link";
import { ResetRequestForm } from "./reset-request-form";

export const metadata: Metadata = { title: "Forgotten password" };

export default function ResetPage() {
  return (
    <>
      <h1 className="mb-1 text-2xl font-bold">Forgotten password</h1>
      <p className="mb-6 text-ink-soft">We will e-mail you a link to set a new one.</p>
      <ResetRequestForm />
      <p className="mt-6 text-center">
        <Link href="/sign-in" className="font-bold text-leaf-dark underline underline-offset-4">
          Back to sign-in
        </Link>
      </p>
    </>
  );
}
