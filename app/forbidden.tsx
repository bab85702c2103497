import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";

export default function Forbidden() {
  return (
    <main className="mx-auto max-w-xl p-10" data-testid="forbidden">
      <p className="text-sm font-bold uppercase tracking-wide text-danger">403 · Not for your roles</p>
      <h1 className="mt-2 text-3xl font-bold">This area belongs to another role</h1>
      <p className="mt-3 text-ink-soft">Your roles do not include this work. If you need it, ask an administrator to add the role to your account.</p>
      <Link href="/" className={`${buttonClasses("primary")} mt-6`}>
        Back to today
      </Link>
    </main>
  );
}
