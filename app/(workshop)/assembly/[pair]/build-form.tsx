"use client";
import { SPEAKER_AT, type Side } from "@/lib/vocabulary/sides";
import { useActionState, useEffect, useRef, useState } from "react";
import { PrintLabels } from "@/components/register/print-labels";
import { SerialLink } from "@/components/register/serial-link";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { cx } from "@/components/ui/cx";
import { initialFormState, type FormState } from "@/lib/form-state";
import { positionName } from "@/lib/vocabulary/positions";
import { buildSpeakersAction, checkScanAction } from "../actions";

const SIDES: Side[] = ["L", "R"];

export interface SlotOption {
  slot: string;
  label: string;
  kind: "drive_unit" | "crossover" | "trim";
}

type FieldState =
  | { status: "empty" }
  | { status: "checking"; code: string }
  | { status: "ok"; code: string; itemId: string; identity: string }
  | { status: "refused"; code: string; reason: string };

const keyOf = (side: Side, slot: string) => `${side}.${slot}`;
const capitalised = (text: string) => `${text.charAt(0).toUpperCase()}${text.slice(1)}`;

/** The two new speakers, with links and their labels: shown after the build and on a built pair's page. */
export function BuiltSpeakers({ left, right }: { left: string; right: string }) {
  const [printing, setPrinting] = useState(false);
  return (
    <div className="flex flex-col gap-4" data-testid="built-speakers">
      <ul className="grid gap-2 sm:grid-cols-2">
        <li>
          <span className="font-bold">Left speaker:</span> <SerialLink identity={left} />
        </li>
        <li>
          <span className="font-bold">Right speaker:</span> <SerialLink identity={right} />
        </li>
      </ul>
      {printing ? (
        <PrintLabels identities={[left, right]} />
      ) : (
        <p>
          <a
            href="#print-labels"
            className="font-bold text-leaf-dark underline underline-offset-4"
            data-testid="print-speaker-labels"
            onClick={(e) => {
              e.preventDefault();
              setPrinting(true);
            }}
          >
            Print their labels
          </a>
        </p>
      )}
    </div>
  );
}

/**
 * The build: one scan field per position of the model and the crossover, left and right side by
 * side. Each scan is checked on the server as it is entered (Enter, Tab or leaving the field),
 * and the answer shows beside the field: ✓ with the serial, or the reason in red. The fields live
 * in state, so a refused build keeps them; the build itself checks every scan again.
 */
export function BuildForm({ pair, pairId, slots }: { pair: string; pairId: string; slots: SlotOption[] }) {
  const [codes, setCodes] = useState<Record<string, string>>({});
  const [fields, setFields] = useState<Record<string, FieldState>>({});
  const [clean, setClean] = useState(false);
  const [inspected, setInspected] = useState(false);
  const [note, setNote] = useState("");
  /** Fields changed since the last build was refused: the build's answer no longer applies to them. */
  const [edited, setEdited] = useState<Set<string>>(new Set());
  const [state, action] = useActionState(async (prev: FormState, formData: FormData) => {
    const answer = await buildSpeakersAction(prev, formData);
    setEdited(new Set());
    return answer;
  }, initialFormState);
  const inputs = useRef<Record<string, HTMLInputElement | null>>({});
  /** The newest check asked for each field, so a slow answer to an older scan is dropped. */
  const asked = useRef<Record<string, number>>({});
  const fieldsRef = useRef(fields);
  useEffect(() => {
    fieldsRef.current = fields;
  }, [fields]);

  const order = SIDES.flatMap((side) => slots.map((s) => keyOf(side, s.slot)));

  const chosenExcept = (key: string) =>
    Object.entries(fieldsRef.current)
      .filter(([k, f]) => k !== key && f.status === "ok")
      .map(([k, f]) => {
        const [side, slot] = k.split(".") as [Side, string];
        return { side, slot, itemId: (f as { itemId: string }).itemId };
      });

  async function check(side: Side, slot: string, code: string, thenPartner = true) {
    const key = keyOf(side, slot);
    const text = code.trim();
    if (!text) {
      setFields((f) => ({ ...f, [key]: { status: "empty" } }));
      return;
    }
    const n = (asked.current[key] ?? 0) + 1;
    asked.current[key] = n;
    const checking: FieldState = { status: "checking", code: text };
    fieldsRef.current = { ...fieldsRef.current, [key]: checking };
    setFields((f) => ({ ...f, [key]: checking }));
    const fd = new FormData();
    fd.set("pairId", pairId);
    fd.set("side", side);
    fd.set("slot", slot);
    fd.set("code", text);
    fd.set("chosen", JSON.stringify(chosenExcept(key)));
    let next: FieldState;
    try {
      const r = await checkScanAction(undefined, fd);
      next = r.ok && r.data ? { status: "ok", code: text, itemId: r.data.itemId!, identity: r.data.identity! } : { status: "refused", code: text, reason: r.message ?? "This scan was refused." };
    } catch {
      next = { status: "refused", code: text, reason: "The check did not reach the server. Scan again." };
    }
    if (asked.current[key] !== n) return;
    fieldsRef.current = { ...fieldsRef.current, [key]: next };
    setFields((f) => ({ ...f, [key]: next }));
    // The partner rule runs both ways: a new scan here may settle (or unsettle) the other side.
    const other = keyOf(side === "L" ? "R" : "L", slot);
    const otherCode = fieldsRef.current[other];
    if (thenPartner && otherCode && otherCode.status !== "empty" && otherCode.status !== "checking") await check(side === "L" ? "R" : "L", slot, otherCode.code, false);
  }

  const onCommit = (side: Side, slot: string) => {
    const key = keyOf(side, slot);
    const code = (codes[key] ?? "").trim();
    const f = fieldsRef.current[key];
    if (f && f.status !== "empty" && f.code === code) return;
    void check(side, slot, code);
  };

  const focusNext = (key: string) => {
    const i = order.indexOf(key);
    const next = order.slice(i + 1).find((k) => fieldsRef.current[k]?.status !== "ok");
    inputs.current[next ?? ""]?.focus();
  };

  // The first field takes the scanner when the form is first shown.
  const first = order[0] ?? "";
  useEffect(() => inputs.current[first]?.focus(), [first]);

  if (state.ok && state.data?.left && state.data.right) {
    return (
      <div className="flex flex-col gap-4">
        <Notice tone="leaf" testId="build-done">
          {state.message}
        </Notice>
        <BuiltSpeakers left={state.data.left} right={state.data.right} />
      </div>
    );
  }

  const scans = SIDES.flatMap((side) => slots.map((s) => ({ side, slot: s.slot, code: (codes[keyOf(side, s.slot)] ?? "").trim() })));
  const serverErrors = state.ok ? undefined : state.fieldErrors;
  const ready = order.every((k) => fields[k]?.status === "ok");

  return (
    <form action={action} className="flex flex-col gap-6" data-testid="build-form">
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="build-error">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="pair" value={pair} />
      <input type="hidden" name="pairId" value={pairId} />
      <input type="hidden" name="scans" value={JSON.stringify(scans)} />
      <div className="grid gap-6 md:grid-cols-2">
        {SIDES.map((side) => (
          <fieldset key={side} className="flex flex-col gap-4 rounded-lg border border-line bg-paper p-4" data-testid={`side-${side}`}>
            <legend className="px-1 text-lg font-bold">{SPEAKER_AT[side]}</legend>
            {slots.map((s) => {
              const key = keyOf(side, s.slot);
              const f = fields[key] ?? { status: "empty" };
              const server = edited.has(key) ? undefined : serverErrors?.[key];
              const id = `scan-${side}-${s.slot}`;
              const refused = f.status === "refused" ? f.reason : server?.join(" ");
              return (
                <div key={key} className="flex flex-col gap-1.5">
                  <label htmlFor={id} className="font-bold">
                    {s.kind === "trim" ? `${capitalised(s.label)} (${s.slot})` : capitalised(positionName(s.slot))}
                  </label>
                  <input
                    id={id}
                    ref={(el) => {
                      inputs.current[key] = el;
                    }}
                    autoComplete="off"
                    spellCheck={false}
                    className={cx(controlClasses, "serial")}
                    value={codes[key] ?? ""}
                    aria-invalid={refused ? true : undefined}
                    aria-describedby={`${id}-result`}
                    data-testid={`scan-${key}`}
                    onChange={(e) => {
                      const v = e.target.value;
                      setCodes((c) => ({ ...c, [key]: v }));
                      setEdited((s) => (s.has(key) ? s : new Set(s).add(key)));
                    }}
                    onBlur={() => onCommit(side, s.slot)}
                    onKeyDown={(e) => {
                      // A scanner ends its label with Enter: check this field and go on, never submit the build.
                      if (e.key === "Enter") {
                        e.preventDefault();
                        onCommit(side, s.slot);
                        focusNext(key);
                      }
                    }}
                  />
                  <p id={`${id}-result`} aria-live="polite" className="min-h-6 text-sm" data-testid={`result-${key}`}>
                    {f.status === "checking" ? <span className="text-ink-soft">Checking…</span> : null}
                    {f.status === "ok" && !server ? (
                      <span className="font-bold text-leaf-dark">
                        ✓ <span className="serial">{f.identity}</span>
                      </span>
                    ) : null}
                    {f.status !== "checking" && refused ? <span className="font-bold text-danger">{refused}</span> : null}
                  </p>
                </div>
              );
            })}
          </fieldset>
        ))}
      </div>

      <fieldset className="flex flex-col gap-3 rounded-lg border border-line bg-surface p-4" data-testid="inspection">
        <legend className="px-1 text-lg font-bold">Final clean and inspection</legend>
        <label className="flex min-h-12 cursor-pointer items-center gap-3">
          <input type="checkbox" name="clean" checked={clean} onChange={(e) => setClean(e.target.checked)} className="size-5 accent-leaf" aria-describedby={serverErrors?.clean ? "clean-error" : undefined} />
          <span>Both speakers cleaned: no dust, flux or fingerprints</span>
        </label>
        {serverErrors?.clean ? (
          <p id="clean-error" className="text-sm font-bold text-danger">
            {serverErrors.clean.join(" ")}
          </p>
        ) : null}
        <label className="flex min-h-12 cursor-pointer items-center gap-3">
          <input type="checkbox" name="inspected" checked={inspected} onChange={(e) => setInspected(e.target.checked)} className="size-5 accent-leaf" aria-describedby={serverErrors?.inspected ? "inspected-error" : undefined} />
          <span>Final inspection done: every unit seated, every joint and screw checked</span>
        </label>
        {serverErrors?.inspected ? (
          <p id="inspected-error" className="text-sm font-bold text-danger">
            {serverErrors.inspected.join(" ")}
          </p>
        ) : null}
        <label htmlFor="inspection-note" className="font-bold">
          Note (optional)
        </label>
        <textarea id="inspection-note" name="note" value={note} onChange={(e) => setNote(e.target.value)} maxLength={500} rows={2} className={cx(controlClasses, "py-2")} aria-describedby={serverErrors?.note ? "note-error" : undefined} />
        {serverErrors?.note ? (
          <p id="note-error" className="text-sm font-bold text-danger">
            {serverErrors.note.join(" ")}
          </p>
        ) : null}
      </fieldset>

      {serverErrors?.scans ? <Notice tone="danger">{serverErrors.scans.join(" ")}</Notice> : null}
      <div className="flex flex-wrap items-center gap-4">
        <SubmitButton pendingLabel="Building…" data-testid="build-submit">
          Build the speakers
        </SubmitButton>
        <span className="text-sm text-ink-soft">{ready ? "Every field is checked." : "Every field is checked again when you build."}</span>
      </div>
    </form>
  );
}
