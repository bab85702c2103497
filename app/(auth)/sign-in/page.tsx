import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentUser } from "@/lib/auth/guard";
import { localPath } from "@/lib/input/local-path";
import { SignInForm } from "./sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string | string[] }> }) {
  if (await currentUser()) redirect("/");
  const { next } = await searchParams;
  return (
    <>
      <h1 className="mb-1 text-2xl font-bold">Sign in</h1>
      <p className="mb-6 text-ink-soft">Use the e-mail address your workshop registered for you.</p>
      {/* Only a way back the gate accepts is carried through the form. */}
      <SignInForm next={localPath(next) ?? undefined} />
    </>
  );
}
