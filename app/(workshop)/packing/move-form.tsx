"use client";
import { useId, useState } from "react";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState } from "@/lib/forms";
import { moveCartonAction } from "./actions";
import { LOCATION_HINT } from "./schemas";

/** Records that a packed carton was moved to another storage place. */
export function MoveForm({ cartons, locations }: { cartons: { carton: string; location: string | null }[]; locations: string[] }) {
  const [carton, setCarton] = useState("");
  const [location, setLocation] = useState("");
  const [state, action, pending] = useActionStateThen(moveCartonAction, initialFormState, () => setLocation(""));
  const id = useId();
  const submit = submitKeepingFields(action, pending);
  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  if (cartons.length === 0) return null;
  return (
    <form onSubmit={submit} aria-busy={pending} className="flex flex-col gap-3" noValidate data-testid="move-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "moved" : "move-refused"}>
          {state.message}
        </Notice>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-[1fr_1fr_auto] sm:items-end">
        <div className="flex flex-col gap-1.5">
          <label htmlFor={`${id}-carton`} className="font-bold">
            Carton
          </label>
          <select id={`${id}-carton`} name="carton" value={carton} onChange={(e) => setCarton(e.currentTarget.value)} className={`${controlClasses} serial`} aria-invalid={errors("carton")?.length ? true : undefined} aria-describedby={errors("carton")?.length ? `${id}-carton-error` : undefined}>
            <option value="">Choose the carton…</option>
            {cartons.map((c) => (
              <option key={c.carton} value={c.carton}>
                {c.location ? `${c.carton}, at ${c.location}` : `${c.carton}, place not recorded`}
              </option>
            ))}
          </select>
          {errors("carton")?.length ? (
            <p id={`${id}-carton-error`} className="text-sm font-bold text-danger">
              {errors("carton")!.join(" ")}
            </p>
          ) : null}
        </div>
        <div className="flex flex-col gap-1.5">
          <label htmlFor={`${id}-location`} className="font-bold">
            New place
          </label>
          <input id={`${id}-location`} name="location" value={location} list={`${id}-places`} onChange={(e) => setLocation(e.currentTarget.value)} className={controlClasses} autoComplete="off" placeholder={LOCATION_HINT} aria-invalid={errors("location")?.length ? true : undefined} aria-describedby={errors("location")?.length ? `${id}-location-error` : undefined} />
          <datalist id={`${id}-places`}>
            {locations.map((l) => (
              <option key={l} value={l} />
            ))}
          </datalist>
          {errors("location")?.length ? (
            <p id={`${id}-location-error`} className="text-sm font-bold text-danger">
              {errors("location")!.join(" ")}
            </p>
          ) : null}
        </div>
        <Button type="submit" variant="secondary" disabled={pending} aria-busy={pending}>
          {pending ? "Saving…" : "Record the move"}
        </Button>
      </div>
    </form>
  );
}
