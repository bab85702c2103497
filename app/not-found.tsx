import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl p-10">
      <p className="text-sm font-bold uppercase tracking-wide text-ink-soft">404</p>
      <h1 className="mt-2 text-3xl font-bold">Nothing is registered here</h1>
      <p className="mt-3 text-ink-soft">The address may be mistyped, or the record may not exist.</p>
      <Link href="/" className={`${buttonClasses("primary")} mt-6`}>
        Back to today
      </Link>
    </main>
  );
}
