"use client";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

const fileClasses = `${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`;
const MAX_TOTAL = 20 * 1024 * 1024;

/**
 * Many response files at once, each matched to its unit by the serial in its first line or its
 * name: a batch's drive units (by Twinleaf or maker's serial), or, without a batch, crossover
 * boards by their serials.
 */
export function ResponseUpload({ batch, noun = "unit" }: { batch?: string; noun?: "unit" | "board" }) {
  const router = useRouter();
  const [files, setFiles] = useState<File[]>([]);
  const [state, setState] = useState<{ phase: "idle" | "reading" | "sending" | "done" | "failed"; message?: string; problems?: string[]; progress?: string }>({ phase: "idle" });
  const send = async () => {
    const total = files.reduce((s, f) => s + f.size, 0);
    if (total > MAX_TOTAL) {
      setState({ phase: "failed", message: `The files come to ${(total / 1048576).toFixed(1)} MB; send at most 20 MB at once.` });
      return;
    }
    const read: { name: string; text: string }[] = [];
    for (const [i, f] of files.entries()) {
      setState({ phase: "reading", progress: `Reading file ${i + 1} of ${files.length}…` });
      read.push({ name: f.name, text: await f.text() });
    }
    setState({ phase: "sending", progress: `Checking and saving ${files.length} files…` });
    const res = await fetch("/api/v1/lab/responses", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(batch ? { batch, files: read } : { files: read }) });
    const body = await res.json().catch(() => ({}));
    if (!res.ok) {
      setState({ phase: "failed", message: body.error ?? "The files could not be saved.", problems: body.fieldErrors?.files });
      return;
    }
    setState({ phase: "done", message: `Saved ${body.saved.length} responses.` });
    router.refresh();
  };
  const busy = state.phase === "reading" || state.phase === "sending";
  return (
    <div className="flex flex-col gap-3" data-testid="response-upload">
      {state.phase === "done" ? <Notice tone="leaf" testId="responses-saved">{state.message}</Notice> : null}
      {state.phase === "failed" ? (
        <Notice tone="danger" testId="responses-error">
          {state.message}
          {state.problems?.length ? (
            <ul className="mt-1 list-disc pl-5">
              {state.problems.map((p) => (
                <li key={p}>{p}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      <label className="flex flex-col gap-1">
        <span className="font-bold">Response files</span>
        <input type="file" multiple accept=".txt,.frd,.csv,.dat,text/plain" className={fileClasses} onChange={(e) => setFiles([...(e.currentTarget.files ?? [])])} disabled={busy} />
        <span className="text-sm text-ink-soft">
          {noun === "board"
            ? "Each file is matched to its board by the board's serial in its first line or its file name. If any file is wrong, none is saved."
            : "Each file is matched to its unit by the Twinleaf or maker serial in its first line or its file name. If any file is wrong, none is saved."}
        </span>
      </label>
      <div className="flex items-center gap-3">
        <Button onClick={send} disabled={busy || files.length === 0} aria-busy={busy}>
          {busy ? "Working…" : files.length ? `Save ${files.length} response${files.length === 1 ? "" : "s"}` : "Save responses"}
        </Button>
        {busy ? (
          <span role="status" className="text-ink-soft">
            {state.progress}
          </span>
        ) : null}
      </div>
    </div>
  );
}

