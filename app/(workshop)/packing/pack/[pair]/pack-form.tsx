"use client";
import { useActionState, useId, useRef, useState, type KeyboardEvent } from "react";
import { submitKeepingFields } from "@/components/ui/kept-form";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState } from "@/lib/form-state";
import { packPairAction } from "../../actions";
import { LOCATION_HINT } from "../../words";

/** A line of the packing list as lib/dispatch's packingLines gives it (kept here: that module is server-only). */
interface PackingLine {
  label: string;
  code: string | null;
  mode: "left" | "right" | "scan" | "tick";
}

/**
 * Packing by scan: one box per thing that carries a code (the left and right speakers' serials,
 * each accessory with a GTIN or code), in packing order. A scanner types the code and presses
 * Enter; Enter moves to the next box instead of sending the form. Lines without a code are
 * ticked. The server checks every scan and answers beside the box; nothing is trusted from here.
 */
export function PackForm({ pair, lines, locations }: { pair: string; lines: PackingLine[]; locations: string[] }) {
  const [state, action, pending] = useActionState(packPairAction, initialFormState);
  const [scans, setScans] = useState<Record<string, string>>({});
  const [ticked, setTicked] = useState<string[]>([]);
  const [location, setLocation] = useState("");
  const formRef = useRef<HTMLFormElement>(null);
  const id = useId();
  const submit = submitKeepingFields(action, pending);
  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  const ticks = lines.filter((l) => l.mode === "tick");

  // The field each scanned line answers under, as lib/dispatch names it.
  let scanIndex = 0;
  const fieldOf = (line: PackingLine) => (line.mode === "left" ? "left" : line.mode === "right" ? "right" : `scan-${scanIndex++}`);
  const boxes = lines.filter((l) => l.mode !== "tick").map((line) => ({ line, field: fieldOf(line) }));
  const filled = boxes.filter((b) => (scans[b.field] ?? "").trim() !== "").length;

  // A scanner ends with Enter: go on to the next empty box (or the location) rather than submit.
  const onScanKey = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key !== "Enter") return;
    e.preventDefault();
    const all = [...(formRef.current?.querySelectorAll<HTMLInputElement>("input[data-scan-box], input[name=location]") ?? [])];
    const here = all.indexOf(e.currentTarget);
    const next = all.slice(here + 1).find((el) => el.value.trim() === "" || el.name === "location");
    (next ?? all[here + 1])?.focus();
  };

  return (
    <form ref={formRef} onSubmit={submit} aria-busy={pending} className="flex flex-col gap-5" noValidate data-testid="pack-form">
      {state.message && !state.ok ? (
        <Notice tone="danger" testId="pack-refused">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="pair" value={pair} />
      <fieldset className="flex flex-col gap-3">
        <legend className="mb-1 font-bold">Scan each thing as it goes into the carton</legend>
        <p className="text-sm text-ink-soft">
          Scan the label on each speaker and each boxed accessory; the next box is ready after each scan. {filled} of {boxes.length} scanned.
        </p>
        <div className="grid gap-4 sm:grid-cols-2">
          {boxes.map(({ line, field }) => (
            <div key={field} data-testid={`scan-box-${field}`}>
              <TextField
                label={line.label}
                name={field.startsWith("scan-") ? "scan" : field}
                value={scans[field] ?? ""}
                onChange={(e) => {
                  const v = e.currentTarget.value;
                  setScans((s) => ({ ...s, [field]: v }));
                }}
                onKeyDown={onScanKey}
                autoComplete="off"
                spellCheck={false}
                className="serial text-lg"
                hint={line.mode === "scan" ? `Code ${line.code}` : line.mode === "left" ? "The serial on the left speaker's label." : "The serial on the right speaker's label."}
                errors={errors(field)}
                data-scan-box=""
                data-testid={`scan-${field}`}
              />
            </div>
          ))}
        </div>
      </fieldset>
      {ticks.length ? (
        <fieldset className="flex flex-col gap-2" aria-describedby={errors("checked")?.length ? `${id}-checked-error` : `${id}-checked-hint`}>
          <legend className="mb-1 font-bold">Tick the rest as it goes in</legend>
          <p id={`${id}-checked-hint`} className="text-sm text-ink-soft">
            {ticked.length} of {ticks.length} ticked.
          </p>
          <ul className="grid gap-2 sm:grid-cols-2">
            {ticks.map(({ label }) => (
              <li key={label}>
                <label className="flex min-h-16 cursor-pointer items-center gap-4 rounded-lg border-2 border-line bg-surface px-4 text-lg has-checked:border-leaf has-checked:bg-leaf-soft">
                  <input
                    type="checkbox"
                    name="checked"
                    value={label}
                    checked={ticked.includes(label)}
                    onChange={(e) => {
                      const on = e.currentTarget.checked;
                      setTicked((list) => (on ? [...list, label] : list.filter((l) => l !== label)));
                    }}
                    className="size-7 accent-leaf"
                    data-testid="pack-item"
                  />
                  <span>{label}</span>
                </label>
              </li>
            ))}
          </ul>
          {errors("checked")?.length ? (
            <p id={`${id}-checked-error`} className="text-sm font-bold text-danger" data-testid="checked-error">
              {errors("checked")!.join(" ")}
            </p>
          ) : null}
        </fieldset>
      ) : null}
      <div className="max-w-md">
        <TextField label="Storage location" name="location" value={location} onChange={(e) => setLocation(e.currentTarget.value)} suggestions={locations} autoComplete="off" hint={LOCATION_HINT} errors={errors("location")} />
      </div>
      <p className="font-bold text-caution">A packed pair is heavy: lift the carton with two people or a lifting aid.</p>
      <div>
        <Button type="submit" disabled={pending} aria-busy={pending} data-testid="pack-submit">
          {pending ? "Packing…" : "Pack the pair"}
        </Button>
      </div>
    </form>
  );
}
