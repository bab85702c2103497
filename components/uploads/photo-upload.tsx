"use client";
import { useRouter } from "next/navigation";
import { useId, useRef, useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { controlClasses, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

const ACCEPT = "image/jpeg,image/png,image/webp";
/** Mirrors MAX_UPLOAD_BYTES in lib/uploads (server-only); the server checks again in any case. */
const DEFAULT_MAX_BYTES = 10 * 1024 * 1024;

const photos = (n: number) => `${n} ${n === 1 ? "photo" : "photos"}`;
const megabytes = (bytes: number) => `${Math.round((bytes / (1024 * 1024)) * 10) / 10} MB`;

type State = { phase: "idle" } | { phase: "sending"; count: number; percent: number | null } | { phase: "error"; message: string } | { phase: "done"; count: number };

/** Sends the form with progress (fetch cannot report upload progress; XMLHttpRequest can). */
function send(form: FormData, onProgress: (percent: number) => void): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", "/api/v1/veneer/photos");
    xhr.responseType = "text";
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(Math.round((e.loaded / e.total) * 100));
    };
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        // not JSON (a proxy's error page): the status speaks
      }
      resolve({ status: xhr.status, body });
    };
    xhr.onerror = () => reject(new Error("network"));
    xhr.send(form);
  });
}

/** Adds photos of a flitch or leaf. Every photo is checked by the server; one bad photo keeps them all. */
export function PhotoUpload({ identity, label = "Add photos", maxBytes = DEFAULT_MAX_BYTES }: { identity: string; label?: string; maxBytes?: number }) {
  const router = useRouter();
  const formRef = useRef<HTMLFormElement>(null);
  const inputId = useId();
  const [count, setCount] = useState(0);
  const [state, setState] = useState<State>({ phase: "idle" });
  const busy = state.phase === "sending";

  const submit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const form = e.currentTarget;
    const files = Array.from((form.elements.namedItem("file") as HTMLInputElement).files ?? []);
    if (files.length === 0) return setState({ phase: "error", message: "Choose at least one photo." });
    // A quick check before sending megabytes over the workshop network.
    const big = files.find((f) => f.size > maxBytes);
    if (big) return setState({ phase: "error", message: `${big.name} is ${megabytes(big.size)}; the limit is ${megabytes(maxBytes)} a file. Nothing was sent.` });

    const data = new FormData(form);
    data.set("identity", identity);
    setState({ phase: "sending", count: files.length, percent: null });
    try {
      const { status, body } = await send(data, (percent) => setState({ phase: "sending", count: files.length, percent }));
      if (status !== 201) {
        const b = (body ?? {}) as { error?: string };
        return setState({ phase: "error", message: b.error ?? `The photos could not be saved (the server answered ${status}). Nothing was kept; try again.` });
      }
      formRef.current?.reset();
      setCount(0);
      setState({ phase: "done", count: files.length });
      router.refresh();
    } catch {
      setState({ phase: "error", message: "The connection dropped before the photos arrived. Nothing was kept; try again." });
    }
  };

  return (
    <form ref={formRef} onSubmit={submit} className="flex flex-col gap-4" data-testid="photo-upload" aria-busy={busy}>
      {state.phase === "error" ? (
        <Notice tone="danger" testId="photo-upload-error">
          {state.message}
        </Notice>
      ) : null}
      {state.phase === "done" ? <Notice tone="leaf">{`${photos(state.count)} added to ${identity}.`}</Notice> : null}
      <div className="flex flex-col gap-1.5">
        <label htmlFor={inputId} className="font-bold">
          {label}
        </label>
        <input
          id={inputId}
          type="file"
          name="file"
          accept={ACCEPT}
          multiple
          disabled={busy}
          aria-describedby={`${inputId}-hint`}
          onChange={(e) => setCount(e.currentTarget.files?.length ?? 0)}
          className={`${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`}
        />
        <p id={`${inputId}-hint`} className="text-sm text-ink-soft">
          {`JPEG, PNG or WebP, up to ${megabytes(maxBytes)} each.`}
        </p>
      </div>
      <TextField label="Caption (optional)" name="caption" maxLength={500} disabled={busy} hint="Shown under each photo of this batch." />
      <div>
        <Button type="submit" disabled={busy || count === 0} aria-busy={busy}>
          {state.phase === "sending"
            ? `Uploading ${photos(state.count)}…${state.percent !== null && state.percent < 100 ? ` ${state.percent}%` : ""}`
            : count > 0
              ? `Upload ${photos(count)}`
              : "Upload"}
        </Button>
      </div>
    </form>
  );
}
