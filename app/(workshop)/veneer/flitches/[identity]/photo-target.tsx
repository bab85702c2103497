"use client";
import { useState } from "react";
import { PhotoUpload } from "@/components/uploads/photo-upload";

/** Which photo is being added: of the whole flitch, or of one leaf. */
export function PhotoTarget({ flitch, leaves }: { flitch: string; leaves: { identity: string; seq: number }[] }) {
  const [target, setTarget] = useState(flitch);
  return (
    <div className="flex flex-col gap-3">
      <label className="flex min-w-0 max-w-full flex-col gap-1">
        <span className="font-bold">Photo of</span>
        <select value={target} onChange={(e) => setTarget(e.target.value)} className="h-12 w-full max-w-full rounded-md border border-line-strong bg-surface px-3" data-testid="photo-target">
          <option value={flitch}>the whole flitch</option>
          {leaves.map((l) => (
            <option key={l.identity} value={l.identity}>
              leaf {l.seq}
            </option>
          ))}
        </select>
      </label>
      <PhotoUpload key={target} identity={target} />
    </div>
  );
}
