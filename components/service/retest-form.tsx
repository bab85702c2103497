"use client";
import { PairResponseForm } from "@/components/lab/pair-response-form";
import type { FormState } from "@/lib/form-state";

/** The repaired pair's finished left and right responses, read in the browser and sent as text. */
export function RetestForm({ code, action }: { code: string; action: (state: FormState, data: FormData) => Promise<FormState> }) {
  return <PairResponseForm action={action} testIds={{ form: "retest-form", error: "retest-error", file: "retest" }} fields={() => <input type="hidden" name="code" value={code} />} />;
}
