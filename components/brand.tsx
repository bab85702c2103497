/** Twinleaf's mark: two leaves mirrored about a centre line, like a bookmatched pair. */
export function Mark({ size = 32 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden="true">
      <path d="M15 4C8 7 5 13 6 24c4-1 9-5 9-20z" fill="#2e6a57" />
      <path d="M17 4c7 3 10 9 9 20-4-1-9-5-9-20z" fill="#7b4f32" />
      <path d="M16 3v26" stroke="#1d2326" strokeWidth="1.5" />
    </svg>
  );
}

export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2 text-xl font-bold tracking-tight">
      <Mark />
      Twinleaf
    </span>
  );
}
