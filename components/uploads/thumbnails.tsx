import type { Upload } from "@/db/schema/uploads";

type Shown = Pick<Upload, "id" | "originalName" | "caption" | "width" | "height">;

const THUMB_MAX_PX = 320;

/** The preview's size, for a stable layout before it loads (previews fit in 320 × 320). */
function thumbSize(u: Shown) {
  if (!u.width || !u.height) return { width: THUMB_MAX_PX, height: THUMB_MAX_PX };
  const scale = Math.min(1, THUMB_MAX_PX / Math.max(u.width, u.height));
  return { width: Math.max(1, Math.round(u.width * scale)), height: Math.max(1, Math.round(u.height * scale)) };
}

/** A grid of photo previews, each opening the full photo in a new tab. Load rows with listUploads. */
export function Thumbnails({ uploads, empty = "No photos yet." }: { uploads: Shown[]; empty?: string }) {
  if (uploads.length === 0) {
    return (
      <p className="text-ink-soft" data-testid="thumbnails">
        {empty}
      </p>
    );
  }
  return (
    <ul className="grid grid-cols-2 gap-4 sm:grid-cols-3 lg:grid-cols-4" data-testid="thumbnails">
      {uploads.map((u) => (
        <li key={u.id} className="flex flex-col gap-1.5">
          <a
            href={`/api/v1/uploads/${u.id}`}
            target="_blank"
            rel="noopener noreferrer"
            className="block overflow-hidden rounded-lg border border-line bg-paper focus-visible:outline-2 focus-visible:outline-leaf"
          >
            {/* A plain img: the preview is already small and comes from a guarded route, not the image optimiser. */}
            {/* eslint-disable-next-line @next/next/no-img-element */}
            <img src={`/api/v1/uploads/${u.id}?size=thumb`} alt={u.caption || u.originalName} loading="lazy" {...thumbSize(u)} className="aspect-square w-full object-contain" />
            <span className="sr-only"> (opens the full photo in a new tab)</span>
          </a>
          {u.caption ? <p className="text-sm">{u.caption}</p> : null}
          <p className="truncate text-sm text-ink-soft" title={u.originalName}>
            {u.originalName}
          </p>
        </li>
      ))}
    </ul>
  );
}
