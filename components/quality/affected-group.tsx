"use client";
import Link from "next/link";
import { useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { TD, TH, TR, Table } from "@/components/ui/table";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { initialFormState, type FormState } from "@/lib/form-state";
import { itemHref } from "@/lib/paths";
import { AFFECTED_ACTION_WORDS, AFFECTED_ACTIONS, AFFECTED_STATE_WORDS, type AffectedAction, type AffectedGroup, type AffectedState } from "@/lib/vocabulary/containments";

/** One affected serial as the page hands it to the browser: words only, already formatted. */
export interface AffectedLine {
  serial: string;
  kind: string;
  pair: string | null;
  now: string;
  /** The dealer (and owner) of a shipped serial. */
  whereabouts: string | null;
  state: AffectedState;
  done: boolean;
  /** When it last moved, who moved it and their note; null until it first moves. */
  last: string | null;
  caseCode: string | null;
  caseHref: string | null;
}

/**
 * One group's affected serials with their tick boxes and the action form. Only the shown page of
 * rows has boxes; "every serial of this group" lets the server pick the rest, so a group of
 * thousands never puts thousands of boxes in the browser.
 */
export function AffectedGroupTable({
  code,
  group,
  lines,
  total,
  canWork,
  shipped,
  action,
}: {
  code: string;
  group: AffectedGroup;
  lines: AffectedLine[];
  total: number;
  canWork: boolean;
  shipped: boolean;
  action: (state: FormState, formData: FormData) => Promise<FormState>;
}) {
  const [ticked, setTicked] = useState<Set<string>>(new Set());
  const [whole, setWhole] = useState(false);
  const [to, setTo] = useState<AffectedAction | "">("");
  const [note, setNote] = useState("");
  const [state, formAction, pending] = useActionStateThen(action, initialFormState, () => {
    setTicked(new Set());
    setWhole(false);
    setNote("");
  });
  const submit = submitKeepingFields(formAction, pending);
  const errors = (f: string) => (!state.ok ? state.fieldErrors?.[f] : undefined);
  const open = lines.filter((l) => !l.done);
  const allShown = open.length > 0 && open.every((l) => ticked.has(l.serial));
  const toggle = (serial: string) =>
    setTicked((prev) => {
      const next = new Set(prev);
      if (next.has(serial)) next.delete(serial);
      else next.add(serial);
      return next;
    });

  const table = (
      <Table data-testid={`affected-${group}`}>
        <caption className="sr-only">Affected serials, {group.replace("_", " ")}</caption>
        <thead>
          <tr>
            {canWork ? (
              <TH className="w-10">
                <input type="checkbox" aria-label="Tick every serial shown that is not dealt with" className="size-5 accent-leaf" checked={allShown} disabled={!open.length || whole} onChange={() => setTicked(allShown ? new Set() : new Set(open.map((l) => l.serial)))} />
              </TH>
            ) : null}
            <TH>Serial</TH>
            <TH>Pair</TH>
            <TH>Now</TH>
            {shipped ? <TH>Dealer and owner</TH> : null}
            <TH>Containment</TH>
            <TH>Last step</TH>
            <TH>Service case</TH>
          </tr>
        </thead>
        <tbody>
          {lines.map((l) => (
            <TR key={l.serial} data-serial={l.serial}>
              {canWork ? (
                <TD>
                  <input type="checkbox" name="serials" value={l.serial} aria-label={`Tick ${l.serial}`} className="size-5 accent-leaf" checked={ticked.has(l.serial)} disabled={l.done || whole} onChange={() => toggle(l.serial)} />
                </TD>
              ) : null}
              <TD>
                <Link href={itemHref(l.serial)} className="serial whitespace-nowrap font-bold text-leaf-dark underline">
                  {l.serial}
                </Link>
                <span className="block text-sm text-ink-soft">{l.kind}</span>
              </TD>
              <TD>{l.pair && l.pair !== l.serial ? <Link href={itemHref(l.pair)} className="serial whitespace-nowrap text-leaf-dark underline">{l.pair}</Link> : "—"}</TD>
              <TD>{l.now}</TD>
              {shipped ? <TD className="min-w-40">{l.whereabouts ?? "—"}</TD> : null}
              <TD className="whitespace-nowrap" data-testid="affected-state">{AFFECTED_STATE_WORDS[l.state]}</TD>
              <TD className="min-w-36 text-sm">{l.last ?? "—"}</TD>
              <TD>{l.caseCode && l.caseHref ? <Link href={l.caseHref} className="serial text-leaf-dark underline">{l.caseCode}</Link> : "—"}</TD>
            </TR>
          ))}
        </tbody>
      </Table>
  );

  if (!canWork) return table;
  const chosen = whole ? `every serial of this group that can take the step (${total} in all)` : `${ticked.size} ticked`;
  return (
    <form onSubmit={submit} className="flex flex-col gap-4" data-testid={`move-${group}`} noValidate>
      <input type="hidden" name="code" value={code} />
      <input type="hidden" name="group" value={group} />
      {table}
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={`move-answer-${group}`}>
          {state.message}
        </Notice>
      ) : null}
      {open.length ? (
        <div className="flex flex-col gap-3 rounded-lg border border-line p-4">
          <label className="flex items-center gap-3">
            <input type="checkbox" name="wholeGroup" value="yes" className="size-5 accent-leaf" checked={whole} onChange={(e) => setWhole(e.currentTarget.checked)} data-testid={`whole-${group}`} />
            <span>Act on every serial of this group that can take the step, including those not shown</span>
          </label>
          {errors("serials") ? <p className="text-sm font-bold text-danger">{errors("serials")!.join(" ")}</p> : null}
          <div className="grid gap-4 sm:grid-cols-[minmax(12rem,1fr)_2fr]">
            <SelectField label="What was done" name="to" value={to} onChange={(e) => setTo(e.currentTarget.value as AffectedAction)} options={[{ value: "", label: "Choose…" }, ...AFFECTED_ACTIONS.map((a) => ({ value: a, label: AFFECTED_ACTION_WORDS[a] }))]} errors={errors("to")} />
            <TextField
              label={to === "failed" ? "What the inspection found" : to === "replaced" ? "What replaced it" : "Note"}
              name="note"
              value={note}
              onChange={(e) => setNote(e.currentTarget.value)}
              errors={errors("note")}
              hint={to === "failed" && shipped ? "A failed shipped serial opens a service case." : to === "failed" || to === "replaced" ? "Required." : "Optional."}
              maxLength={1000}
            />
          </div>
          <div>
            <Button type="submit" disabled={pending} aria-busy={pending}>
              {pending ? "Recording…" : `Record for ${chosen}`}
            </Button>
          </div>
        </div>
      ) : null}
    </form>
  );
}
