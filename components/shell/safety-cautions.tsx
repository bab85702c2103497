import { SAFETY_DEFERRAL } from "@/lib/areas";

/** The usual cautions of a station, always with the deferral to the site's own rules. */
export function SafetyCautions({ cautions }: { cautions: string[] }) {
  if (cautions.length === 0) return null;
  return (
    <section aria-labelledby="safety-heading" className="rounded-xl border-2 border-caution/50 bg-caution-soft px-5 py-4" data-testid="safety-cautions">
      <h2 id="safety-heading" className="flex items-center gap-2 text-lg font-bold text-caution">
        <svg width="22" height="22" viewBox="0 0 24 24" aria-hidden="true">
          <path d="M12 2 1 21h22L12 2z" fill="currentColor" />
          <path d="M12 9v5M12 16.5v1.5" stroke="#fff" strokeWidth="2.2" strokeLinecap="round" />
        </svg>
        Take care
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-6">
        {cautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
      <p className="mt-3 text-sm text-ink-soft">{SAFETY_DEFERRAL}</p>
    </section>
  );
}
