"use client";
import { useRouter } from "next/navigation";
import { useActionState, useState } from "react";
import { Button } from "@/components/ui/button";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/forms";
import { TS_CSV_TEMPLATE } from "@/lib/lab/ts-csv";
import { tsCsvAction } from "../../actions/batches";

const fileClasses = `${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`;
const MAX_TOTAL = 20 * 1024 * 1024;

/** Many response files at once, each matched to its unit by the serial in its first line or its name. */
export function ResponseUpload({ batch }: { batch: string }) {
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
    const res = await fetch("/api/v1/lab/responses", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ batch, files: read }) });
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
        <span className="text-sm text-ink-soft">Each file is matched to its unit by the Twinleaf or maker serial in its first line or its file name. If any file is wrong, none is saved.</span>
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

/** Thiele–Small parameters for the whole batch from a pasted or chosen CSV. */
export function TsCsvImport({ batch }: { batch: string }) {
  const [text, setText] = useState("");
  const [state, action] = useActionState(tsCsvAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-3" data-testid="ts-csv-import">
      {state.ok && state.message ? <Notice tone="leaf" testId="ts-csv-done">{state.message}</Notice> : null}
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="ts-csv-error">
          {state.message}
          {state.fieldErrors?.csv ? (
            // Every problem of the file at once: a long list scrolls rather than pushing the form away.
            <ul className="mt-1 max-h-72 list-disc overflow-y-auto pl-5" data-testid="ts-csv-problems" tabIndex={0} aria-label="Problems in the CSV">
              {state.fieldErrors.csv.map((p, i) => (
                <li key={`${i}-${p}`}>{p}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      <input type="hidden" name="batch" value={batch} />
      <p className="text-ink-soft">
        Columns: <code>{TS_CSV_TEMPLATE.trim()}</code>. The serial is the Twinleaf serial or the maker’s. Every row is checked before anything is saved, and every problem is listed at once.
      </p>
      <label className="flex flex-col gap-1">
        <span className="font-bold">Choose a CSV file</span>
        <input type="file" accept=".csv,.txt,text/csv,text/plain" className={fileClasses} onChange={async (e) => setText((await e.currentTarget.files?.[0]?.text()) ?? "")} />
      </label>
      <label className="flex flex-col gap-1">
        <span className="font-bold">…or paste it here</span>
        <textarea name="csv" rows={6} value={text} onChange={(e) => setText(e.target.value)} spellCheck={false} className="rounded-md border border-line-strong bg-surface p-2 font-mono text-sm" />
      </label>
      <div>
        <SubmitButton pendingLabel="Checking and saving…" disabled={!text.trim()}>
          Save parameters
        </SubmitButton>
      </div>
    </form>
  );
}
