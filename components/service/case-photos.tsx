"use client";
import { useRouter } from "next/navigation";
import { useRef, useState, type FormEvent } from "react";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";

/** Photos of what came back; the server checks every one and keeps none if one is refused. */
export function CasePhotos({ code }: { code: string }) {
  const router = useRouter();
  const ref = useRef<HTMLFormElement>(null);
  const [state, setState] = useState<{ tone: "info" | "danger"; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const submit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    if (!(data.getAll("file") as File[]).some((f) => typeof f !== "string" && f.size > 0)) return setState({ tone: "danger", text: "Choose at least one photo." });
    setBusy(true);
    try {
      const res = await fetch(`/api/v1/service/cases/${encodeURIComponent(code)}`, { method: "POST", body: data });
      const body = (await res.json().catch(() => ({}))) as { error?: string; uploads?: unknown[] };
      if (res.status !== 201) return setState({ tone: "danger", text: body.error ?? `The photos could not be saved (the server answered ${res.status}). Nothing was kept.` });
      ref.current?.reset();
      setState({ tone: "info", text: `${body.uploads?.length ?? 0} photo(s) added.` });
      router.refresh();
    } catch {
      setState({ tone: "danger", text: "The connection dropped before the photos arrived. Nothing was kept; try again." });
    } finally {
      setBusy(false);
    }
  };
  return (
    <form ref={ref} onSubmit={submit} className="flex flex-col gap-3" data-testid="case-photos" aria-busy={busy}>
      {state ? <Notice tone={state.tone}>{state.text}</Notice> : null}
      <label className="flex flex-col gap-1.5 font-bold">
        Photos (JPEG, PNG or WebP)
        <input type="file" name="file" accept="image/*" multiple className="text-base" />
      </label>
      <div>
        <Button type="submit" variant="secondary" disabled={busy}>
          {busy ? "Sending…" : "Add the photos"}
        </Button>
      </div>
    </form>
  );
}
