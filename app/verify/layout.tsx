import type { Metadata } from "next";
import type { ReactNode } from "react";
import { Wordmark } from "@/components/brand";

export const metadata: Metadata = {
  title: "Certificate check",
  // Each page answers for one certificate code: nothing for a search engine to list.
  robots: { index: false, follow: false },
};

/** The public shell of the certificate check: no sign-in, no navigation, made for a phone. */
export default function VerifyLayout({ children }: { children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-line bg-surface px-5 py-4">
        <div className="mx-auto max-w-xl">
          <Wordmark />
        </div>
      </header>
      <main className="mx-auto w-full max-w-xl flex-1 px-5 py-8">{children}</main>
      <footer className="px-5 pb-8 text-center text-sm text-ink-soft">Twinleaf keeps the register of every matched pair the workshop builds.</footer>
    </div>
  );
}
