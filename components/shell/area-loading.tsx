import { areaByKey } from "@/lib/areas";

/**
 * What an area's home shows while its figures are read: the area's name and a moving bar, announced
 * once to screen readers ("Opening the lab…"). The bar's motion stops for people who ask for less.
 */
export function AreaLoading({ areaKey }: { areaKey: string }) {
  const area = areaByKey(areaKey);
  return (
    <section className="flex max-w-2xl flex-col gap-4" data-testid="area-loading" aria-busy="true">
      <h1 className="text-3xl font-bold tracking-tight">{area.label}</h1>
      <p role="status" className="text-ink-soft">
        Opening {area.label.toLowerCase()}…
      </p>
      <div className="h-2 w-full max-w-md overflow-hidden rounded-full bg-line" aria-hidden="true">
        <div className="h-full w-1/3 rounded-full bg-leaf motion-safe:animate-[twinleaf-progress_1.2s_ease-in-out_infinite]" />
      </div>
    </section>
  );
}
