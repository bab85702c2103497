"use client";
import { PairResponseForm } from "@/components/lab/pair-response-form";
import { TextField } from "@/components/ui/field";
import { finalTestAction } from "./actions";

/** The finished left and right responses of one pair, read in the browser and sent as text. */
export function FinalTestForm({ pair }: { pair: string }) {
  return (
    <PairResponseForm
      action={finalTestAction}
      testIds={{ form: "final-test-form", error: "final-test-error", file: "final" }}
      fields={(state) => <TextField label="Pair" name="pair" defaultValue={pair} errors={state.fieldErrors?.pair} className="serial" />}
    />
  );
}
