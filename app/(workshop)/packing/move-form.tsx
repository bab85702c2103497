"use client";
import { useState } from "react";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState } from "@/lib/form-state";
import { moveCartonAction } from "./actions";
import { LOCATION_HINT } from "./words";

/** Records that a packed carton was moved to another storage place. */
export function MoveForm({ cartons, locations }: { cartons: { carton: string; location: string | null }[]; locations: string[] }) {
  const [carton, setCarton] = useState("");
  const [location, setLocation] = useState("");
  const [state, action, pending] = useActionStateThen(moveCartonAction, initialFormState, () => setLocation(""));
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
        <SelectField
          label="Carton"
          name="carton"
          value={carton}
          onChange={(e) => setCarton(e.currentTarget.value)}
          className="serial"
          errors={errors("carton")}
          options={[{ value: "", label: "Choose the carton…" }, ...cartons.map((c) => ({ value: c.carton, label: c.location ? `${c.carton}, at ${c.location}` : `${c.carton}, place not recorded` }))]}
        />
        <TextField label="New place" name="location" value={location} onChange={(e) => setLocation(e.currentTarget.value)} suggestions={locations} autoComplete="off" placeholder={LOCATION_HINT} errors={errors("location")} />
        <Button type="submit" variant="secondary" disabled={pending} aria-busy={pending}>
          {pending ? "Saving…" : "Record the move"}
        </Button>
      </div>
    </form>
  );
}
