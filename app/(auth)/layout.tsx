import type { ReactNode } from "react";
import { Wordmark } from "@/components/brand";

export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col items-center justify-center gap-6 px-4 py-10">
      <Wordmark />
      <main className="w-full max-w-md rounded-xl border border-line bg-surface p-7 shadow-sm">{children}</main>
      <p className="max-w-md text-center text-sm text-ink-soft">The register of every matched pair this workshop builds.</p>
    </div>
  );
}
