/** What a form action hands back to its form: kept free of zod, since client forms import it. */
export interface FormState {
  ok: boolean;
  status?: number;
  message?: string;
  fieldErrors?: Record<string, string[] | undefined>;
  values?: Record<string, string | string[]>;
  /** What a successful action hands back to show once, e.g. a new machine token. Never user input. */
  data?: Record<string, string>;
}

export const initialFormState: FormState = { ok: false };
