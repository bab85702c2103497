"use client";
import { useActionState, useId, useState } from "react";
import { submitKeepingFields } from "@/components/ui/kept-form";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState } from "@/lib/forms";
import { packPairAction } from "../../actions";
import { LOCATION_HINT } from "../../schemas";

/**
 * The packing checklist: one big box per item on the model's list, and where the carton goes.
 * Ticks and the location are kept in state, so a refused try loses nothing.
 */
export function PackForm({ pair, items, locations }: { pair: string; items: string[]; locations: string[] }) {
  const [state, action, pending] = useActionState(packPairAction, initialFormState);
  const [ticked, setTicked] = useState<string[]>([]);
  const [location, setLocation] = useState("");
  const id = useId();
  const submit = submitKeepingFields(action, pending);
  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  const all = ticked.length === items.length;

  return (
    <form onSubmit={submit} aria-busy={pending} className="flex flex-col gap-5" noValidate data-testid="pack-form">
      {state.message && !state.ok ? (
        <Notice tone="danger" testId="pack-refused">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="pair" value={pair} />
      <fieldset className="flex flex-col gap-2" aria-describedby={errors("checked")?.length ? `${id}-checked-error` : `${id}-checked-hint`}>
        <legend className="mb-1 font-bold">Into the carton, in this order</legend>
        <p id={`${id}-checked-hint`} className="text-sm text-ink-soft">
          Tick each item as it goes in. {ticked.length} of {items.length} ticked.
        </p>
        <ul className="grid gap-2 sm:grid-cols-2">
          {items.map((label, i) => (
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
                <span>
                  <span className="mr-2 text-ink-soft">{i + 1}.</span>
                  {label}
                </span>
              </label>
            </li>
          ))}
        </ul>
        {errors("checked")?.length ? (
          <p id={`${id}-checked-error`} className="text-sm font-bold text-danger">
            {errors("checked")!.join(" ")}
          </p>
        ) : null}
      </fieldset>
      <div className="max-w-md">
        <TextField label="Storage location" name="location" value={location} onChange={(e) => setLocation(e.currentTarget.value)} suggestions={locations} autoComplete="off" hint={LOCATION_HINT} errors={errors("location")} />
      </div>
      <p className="font-bold text-caution">A packed pair is heavy: lift the carton with two people or a lifting aid.</p>
      <div>
        <Button type="submit" disabled={pending} aria-busy={pending} data-testid="pack-submit">
          {pending ? "Packing…" : all ? "Pack the pair" : `Pack the pair (${items.length - ticked.length} not ticked)`}
        </Button>
      </div>
    </form>
  );
}
