"use client";
import { useState } from "react";
import { useActionStateThen } from "@/components/ui/kept-form";
import { Dialog } from "@/components/ui/dialog";
import { controlClasses, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { useToast } from "@/components/ui/toast";
import { initialFormState } from "@/lib/form-state";
import { failUnitAction, measurementAction } from "../../actions/batches";

const TS = [
  { name: "fsHz", label: "Fs (Hz)" },
  { name: "qts", label: "Qts" },
  { name: "qes", label: "Qes" },
  { name: "qms", label: "Qms" },
  { name: "reOhm", label: "Re (Ω)" },
  { name: "vasL", label: "Vas (L)" },
  { name: "sensitivityDb", label: "Sensitivity (dB, 2.83 V / 1 m)" },
];

/** One unit's measurement: a response file read in the browser and sent as text, and its Thiele–Small parameters. */
export function MeasureDialog({ batch, unit }: { batch: string; unit: { id: string; identity: string } }) {
  const [open, setOpen] = useState(false);
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const toast = useToast();
  const [state, action] = useActionStateThen(measurementAction, initialFormState, (s) => {
    if (s.message) toast(`${unit.identity}: ${s.message}`);
    setOpen(false);
    setFile(null);
  });
  const [failed, fail] = useActionStateThen(failUnitAction, initialFormState, (s) => {
    if (s.message) toast(`${unit.identity}: ${s.message}`);
    setOpen(false);
  });
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : "");
  return (
    <Dialog open={open} onOpenChange={setOpen} trigger="Measure…" triggerLabel={`Measure ${unit.identity}`} title={`Measure ${unit.identity}`} description="A response file (frequency, level, optional phase), its Thiele–Small parameters, or both.">
      <form action={action} className="flex flex-col gap-4" noValidate data-testid="measure-form">
        {!state.ok && state.message ? (
          <Notice tone="danger">
            {state.message}
            {state.fieldErrors?.response ? (
              <ul className="mt-1 list-disc pl-5">
                {state.fieldErrors.response.map((m) => (
                  <li key={m}>{m}</li>
                ))}
              </ul>
            ) : null}
          </Notice>
        ) : null}
        <input type="hidden" name="batch" value={batch} />
        <input type="hidden" name="itemId" value={unit.id} />
        <input type="hidden" name="responseName" value={file?.name ?? ""} />
        <input type="hidden" name="responseText" value={file?.text ?? ""} />
        <label className="flex flex-col gap-1">
          <span className="font-bold">Response file</span>
          <input
            type="file"
            accept=".txt,.frd,.csv,.dat,text/plain"
            className={`${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`}
            onChange={async (e) => {
              const f = e.currentTarget.files?.[0];
              setFile(f ? { name: f.name, text: await f.text() } : null);
            }}
          />
          <span className="text-sm text-ink-soft">{file ? `${file.name}: ${file.text.split(/\r?\n/).length} lines read.` : "Plain text: Hz, dB and optionally phase; spaces, tabs, commas or semicolons."}</span>
        </label>
        <div className="grid grid-cols-2 gap-3">
          {TS.map((f) => (
            <TextField key={f.name} label={f.label} name={f.name} inputMode="decimal" defaultValue={v(f.name)} errors={state.fieldErrors?.[f.name]} />
          ))}
        </div>
        <p className="text-sm text-ink-soft">Give Qes and Qms and Qts is worked out (Qts = Qes·Qms/(Qes+Qms)); a Qts that disagrees with them by more than 2 % is refused.</p>
        <SubmitButton pendingLabel="Saving…">Save measurement</SubmitButton>
      </form>
      <form action={fail} className="mt-6 flex flex-col gap-3 border-t border-line pt-4" data-testid="fail-form">
        <input type="hidden" name="batch" value={batch} />
        <input type="hidden" name="itemId" value={unit.id} />
        {!failed.ok && failed.message ? <Notice tone="danger">{failed.fieldErrors?.reason?.[0] ?? failed.message}</Notice> : null}
        <TextField label="Or set it aside as failed: what is wrong" name="reason" />
        <div>
          <SubmitButton variant="danger" pendingLabel="Saving…">
            Set aside as failed
          </SubmitButton>
        </div>
      </form>
    </Dialog>
  );
}
