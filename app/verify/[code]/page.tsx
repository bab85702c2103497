import { notFound } from "next/navigation";
import { getDb } from "@/db";
import { pageParam } from "@/lib/auth/guard";
import { verifyCertificate } from "@/lib/dispatch";
import { pairOfCertificate } from "@/lib/dispatch/verify";
import { formatDay } from "@/lib/format";
import { OwnerRegistrationForm } from "./registration-form";

/**
 * The public certificate check, reached from the QR code on a pair's certificate. Signed out;
 * shows only what the certificate itself prints (no names, dealer, owner, case or ids), the current
 * revision after a repair with the owner's line about it, and says so when a newer revision exists
 * than the one whose code was opened. Limited per
 * client address in proxy.ts (429 over the limit), so the codes cannot be guessed at speed.
 */
export default async function Page({ params }: { params: Promise<{ code: string }> }) {
  const { code } = await params;
  const text = pageParam(code);
  const found = await verifyCertificate(getDb(), text);
  if (!found) notFound();

  const rows: [string, string | null, boolean][] = [
    ["Model", found.model, false],
    ["Finish", found.finish, false],
    ["Left speaker", found.leftSerial, true],
    ["Right speaker", found.rightSerial, true],
    ["Pair", found.pairSerial, true],
    ["Built", found.buildMonth, false],
    ["Certificate issued", formatDay(found.issuedOn), false],
    ...(found.current.number > 1 ? ([["Current revision", `Revision ${found.current.number}, issued ${formatDay(found.current.issuedOn)}`, false]] as [string, string, boolean][]) : []),
  ];
  const older = found.revision.number < found.current.number;
  // A pair has owners once it has left the workshop; the form says nothing about who they are.
  const shipped = (await pairOfCertificate(getDb(), text))?.shipped ?? false;
  return (
    <article className="flex flex-col gap-5" data-testid="verify-genuine">
      <div className="rounded-xl border-l-4 border-leaf bg-leaf-soft px-5 py-4">
        <p className="flex items-center gap-2 text-sm font-bold uppercase tracking-wide text-leaf-dark">
          <svg width="20" height="20" viewBox="0 0 24 24" aria-hidden="true">
            <circle cx="12" cy="12" r="11" fill="currentColor" />
            <path d="m7 12.5 3.2 3.2L17 9" stroke="#fff" strokeWidth="2.4" fill="none" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
          Verified
        </p>
        <h1 className="mt-1 text-2xl font-bold leading-tight sm:text-3xl">This is a genuine Twinleaf certificate</h1>
        <p className="mt-2 text-ink-soft">The workshop&apos;s register holds this certificate for the matched pair below. Check that the serials match the labels on your speakers.</p>
      </div>
      {older ? (
        <div className="rounded-xl border-l-4 border-walnut bg-surface px-5 py-4" data-testid="verify-newer-revision">
          <p className="font-bold">A newer revision of this certificate exists</p>
          <p className="mt-1 text-ink-soft">
            This is {found.revision.number === 1 ? "the original certificate" : `revision ${found.revision.number}`}, and it is genuine. The pair was serviced since: revision{" "}
            {found.current.number} was issued on {formatDay(found.current.issuedOn)} and describes the pair as it is now.
          </p>
        </div>
      ) : null}
      {found.repairs.length ? (
        <section className="rounded-xl border border-line bg-surface px-5 py-4" data-testid="verify-repairs">
          <h2 className="font-bold">Service</h2>
          <ul className="mt-1 flex flex-col gap-1">
            {found.repairs.map((line, i) => (
              <li key={i}>{line}.</li>
            ))}
          </ul>
        </section>
      ) : null}
      <dl className="divide-y divide-line overflow-hidden rounded-xl border border-line bg-surface">
        {rows.map(([label, value, serial]) => (
          <div key={label} className="flex flex-col gap-0.5 px-5 py-3 sm:flex-row sm:items-baseline sm:justify-between sm:gap-4">
            <dt className="text-sm text-ink-soft">{label}</dt>
            <dd className={serial ? "serial break-all text-lg font-bold" : "text-lg font-bold"} data-testid={`verify-${label.toLowerCase().replace(/\s+/g, "-")}`}>
              {value ?? "Not recorded"}
            </dd>
          </div>
        ))}
      </dl>
      {shipped ? (
        <section className="rounded-xl border border-line bg-surface px-5 py-4" data-testid="verify-register">
          <h2 className="text-lg font-bold">Register your pair</h2>
          <p className="mt-1 mb-4 text-ink-soft">
            Own these speakers? Register them so the workshop can reach you with recall notices and service mail. We send you a link to confirm; nothing is recorded until you open it.
          </p>
          <OwnerRegistrationForm code={text} />
        </section>
      ) : null}
    </article>
  );
}
