"use client";
import { useId, useState } from "react";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { initialFormState } from "@/lib/form-state";
import { PrintForm } from "@/components/register/print-form";
import { HeldMark } from "@/components/register/containment-hold";
import { buttonClasses } from "@/components/ui/button";
import { printPaths } from "@/lib/paths";
import { shipCartonsAction } from "./actions";

export interface ShipCarton {
  carton: string;
  pair: string | null;
  model: string;
  finish: string | null;
  location: string | null;
  packedOn: string;
  /** The open containment holding its pair: shown instead of a box to tick. */
  heldBy?: string | null;
}


/**
 * The cartons waiting to ship, each with a box to tick, and the shipment's particulars. Every
 * field is kept in state, so nothing typed is lost when the action answers with a problem.
 */
export function ShipForm({ cartons, dealers, today }: { cartons: ShipCarton[]; dealers: { id: string; name: string; city: string }[]; today: string }) {
  const [picked, setPicked] = useState<string[]>([]);
  const [dealerId, setDealerId] = useState("");
  const [shippedOn, setShippedOn] = useState(today);
  const [carrier, setCarrier] = useState("");
  const [tracking, setTracking] = useState("");
  // Shipped: the cartons have left the list, and the next shipment starts from a blank form.
  const [state, action, pending] = useActionStateThen(shipCartonsAction, initialFormState, () => {
    setPicked([]);
    setDealerId("");
    setShippedOn(today);
    setCarrier("");
    setTracking("");
  });
  const id = useId();
  const submit = submitKeepingFields(action, pending);

  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  const describe = (field: string) => (errors(field)?.length ? `${id}-${field}-error` : undefined);
  const errorLine = (field: string) =>
    errors(field)?.length ? (
      <p id={`${id}-${field}-error`} className="text-sm font-bold text-danger">
        {errors(field)!.join(" ")}
      </p>
    ) : null;
  const toggle = (carton: string, on: boolean) => setPicked((list) => (on ? [...list, carton] : list.filter((c) => c !== carton)));

  if (cartons.length === 0 && !state.message) return <p className="text-ink-soft" data-testid="nothing-to-ship">No packed cartons are waiting to ship.</p>;

  return (
    <>
    {cartons.map((c) => (
      <PrintForm key={c.carton} formId={`${id}-label-${c.carton}`} action={printPaths.cartonLabel(c.carton)} />
    ))}
    <form onSubmit={submit} aria-busy={pending} className="flex flex-col gap-4" noValidate data-testid="ship-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "shipped" : "ship-refused"}>
          {state.message}
          {state.ok && state.data?.shipment ? (
            <>
              {" "}
              <a href={printPaths.deliveryNote(state.data.shipment)} target="_blank" rel="noopener" className="font-bold underline" data-testid="delivery-note-link">
                Open the delivery note
              </a>
              .
            </>
          ) : null}
        </Notice>
      ) : null}
      {cartons.length ? (
        <fieldset className="flex flex-col gap-2" aria-describedby={describe("cartons")}>
          <legend className="mb-1 font-bold">Cartons to ship</legend>
          <ul className="flex flex-col gap-2" data-testid="waiting-cartons">
            {cartons.map((c) => (
              <li key={c.carton} className="flex flex-wrap items-center gap-3 rounded-lg border border-line bg-surface px-3 py-2 has-checked:border-leaf has-checked:bg-leaf-soft" data-testid="waiting-carton">
                <label className="flex min-h-12 flex-1 cursor-pointer items-center gap-3">
                  {c.heldBy ? null : <input type="checkbox" name="cartons" value={c.carton} checked={picked.includes(c.carton)} onChange={(e) => toggle(c.carton, e.currentTarget.checked)} className="size-6 accent-leaf" />}
                  <span className="flex flex-col">
                    <span className="serial font-bold">{c.carton}</span>
                    <span className="text-sm text-ink-soft">
                      {[c.model, c.finish].filter(Boolean).join(" · ")}
                      {c.pair ? (
                        <>
                          {c.model || c.finish ? " · " : ""}pair <span className="serial">{c.pair}</span>
                        </>
                      ) : null}
                    </span>
                  </span>
                </label>
                <span className="text-sm">
                  {c.location ? (
                    <>
                      <span className="text-ink-soft">Stored at </span>
                      <span className="font-bold">{c.location}</span>
                    </>
                  ) : (
                    <span className="text-ink-soft">Place not recorded</span>
                  )}
                  <span className="text-ink-soft"> · packed {c.packedOn}</span>
                </span>
                {c.heldBy ? <HeldMark code={c.heldBy} /> : null}
                {/* Printing is a POST of its own form, outside the shipment's (forms do not nest). */}
                <button type="submit" form={`${id}-label-${c.carton}`} className={buttonClasses("quiet", "sm")} data-testid="print-carton-label">
                  Print carton label
                </button>
              </li>
            ))}
          </ul>
          {errorLine("cartons")}
        </fieldset>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          label="Dealer"
          name="dealerId"
          value={dealerId}
          onChange={(e) => setDealerId(e.currentTarget.value)}
          errors={errors("dealerId")}
          options={[{ value: "", label: "Choose the dealer…" }, ...dealers.map((d) => ({ value: d.id, label: `${d.name}, ${d.city}` }))]}
        />
        <TextField label="Shipped on" type="date" name="shippedOn" value={shippedOn} max={today} onChange={(e) => setShippedOn(e.currentTarget.value)} errors={errors("shippedOn")} />
        <TextField label="Carrier" name="carrier" value={carrier} onChange={(e) => setCarrier(e.currentTarget.value)} autoComplete="off" errors={errors("carrier")} />
        <TextField label="Tracking number" name="tracking" value={tracking} onChange={(e) => setTracking(e.currentTarget.value)} className="serial" autoComplete="off" spellCheck={false} errors={errors("tracking")} />
      </div>
      <p className="text-sm text-ink-soft">The dealer gets one e-mail listing every pair with the tracking number, and each pair&apos;s certificate attached as a PDF copy.</p>
      <div>
        <Button type="submit" disabled={pending || cartons.length === 0} aria-busy={pending}>
          {pending ? "Shipping…" : `Ship ${picked.length ? `${picked.length} carton${picked.length === 1 ? "" : "s"}` : "the ticked cartons"}`}
        </Button>
      </div>
    </form>
    </>
  );
}
