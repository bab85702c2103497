import { useId, type ComponentProps, type ReactNode } from "react";
import { cx } from "./cx";

export const controlClasses =
  "block w-full min-h-12 rounded-lg border border-line-strong bg-surface px-3 text-base text-ink placeholder:text-ink-soft/70 " +
  "aria-invalid:border-danger aria-invalid:bg-danger-soft/40";

function describedBy(...ids: unknown[]) {
  const joined = ids.filter((v): v is string => typeof v === "string" && v.length > 0).join(" ");
  return joined || undefined;
}

function FieldShell({ id, label, hint, errors, children }: { id: string; label: ReactNode; hint?: ReactNode; errors?: string[]; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-1.5">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      {children}
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {errors?.length ? (
        <p id={`${id}-error`} className="text-sm font-bold text-danger">
          {errors.join(" ")}
        </p>
      ) : null}
    </div>
  );
}

type TextFieldProps = Omit<ComponentProps<"input">, "id"> & { label: ReactNode; name: string; hint?: ReactNode; errors?: string[]; suggestions?: readonly string[] };

/** A labelled input whose hint and error are tied to it with aria-describedby; `suggestions` offer earlier values to pick from. */
export function TextField({ label, hint, errors, className, suggestions, ...input }: TextFieldProps) {
  const id = useId();
  return (
    <FieldShell id={id} label={label} hint={hint} errors={errors}>
      <input
        id={id}
        className={cx(controlClasses, className)}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={describedBy(hint && `${id}-hint`, errors?.length && `${id}-error`)}
        list={suggestions?.length ? `${id}-suggestions` : undefined}
        {...input}
      />
      {suggestions?.length ? (
        <datalist id={`${id}-suggestions`}>
          {suggestions.map((v) => (
            <option key={v} value={v} />
          ))}
        </datalist>
      ) : null}
    </FieldShell>
  );
}

type TextAreaFieldProps = Omit<ComponentProps<"textarea">, "id"> & { label: ReactNode; name: string; hint?: ReactNode; errors?: string[] };

/** A labelled text area, two lines to start with, tied to its hint and error like TextField. */
export function TextAreaField({ label, hint, errors, className, rows = 2, ...textarea }: TextAreaFieldProps) {
  const id = useId();
  return (
    <FieldShell id={id} label={label} hint={hint} errors={errors}>
      <textarea
        id={id}
        rows={rows}
        className={cx(controlClasses, "py-2", className)}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={describedBy(hint && `${id}-hint`, errors?.length && `${id}-error`)}
        {...textarea}
      />
    </FieldShell>
  );
}

type SelectFieldProps = Omit<ComponentProps<"select">, "id"> & {
  label: ReactNode;
  name: string;
  hint?: ReactNode;
  errors?: string[];
  options: { value: string; label: string }[];
};

export function SelectField({ label, hint, errors, options, className, ...select }: SelectFieldProps) {
  const id = useId();
  return (
    <FieldShell id={id} label={label} hint={hint} errors={errors}>
      <select
        id={id}
        className={cx(controlClasses, className)}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={describedBy(hint && `${id}-hint`, errors?.length && `${id}-error`)}
        {...select}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldShell>
  );
}

/** A group of checkboxes sharing one name, as a fieldset with its legend and error. */
export function CheckboxGroup({
  legend,
  name,
  options,
  defaultValues = [],
  errors,
  columns = 4,
}: {
  legend: ReactNode;
  name: string;
  options: { value: string; label: string }[];
  defaultValues?: readonly string[];
  errors?: string[];
  /** Columns on wider screens; two fit a dialog. */
  columns?: 2 | 4;
}) {
  return (
    <CardGroup legend={legend} errors={errors}>
      <div className={cx("grid grid-cols-2 gap-2", columns === 4 && "sm:grid-cols-4")}>
        {options.map((o) => (
          <label key={o.value} className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border border-line bg-surface px-3 has-checked:border-leaf has-checked:bg-leaf-soft">
            <input type="checkbox" name={name} value={o.value} defaultChecked={defaultValues.includes(o.value)} className="size-5 accent-leaf" />
            <span>{o.label}</span>
          </label>
        ))}
      </div>
    </CardGroup>
  );
}

/**
 * A question answered by one of a few choices, each a large tappable card with its radio button;
 * the error is tied to the group with aria-describedby.
 */
export function ChoiceField({ legend, name, value, onChange, options, errors }: { legend: string; name: string; value: string; onChange: (v: string) => void; options: { value: string; label: string }[]; errors?: string[] }) {
  return (
    <CardGroup legend={legend} errors={errors}>
      <div className="grid gap-2 sm:grid-cols-3">
        {options.map((o) => (
          <label key={o.value} className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border border-line bg-surface px-3 py-2 has-checked:border-leaf has-checked:bg-leaf-soft">
            <input type="radio" name={name} value={o.value} checked={value === o.value} onChange={() => onChange(o.value)} className="size-5 shrink-0 accent-leaf" />
            <span>{o.label}</span>
          </label>
        ))}
      </div>
    </CardGroup>
  );
}

/** The fieldset of a group of choice cards: its legend, the cards, and its error tied to it with aria-describedby. */
function CardGroup({ legend, errors, children }: { legend: ReactNode; errors?: string[]; children: ReactNode }) {
  const id = useId();
  return (
    <fieldset className="flex flex-col gap-2" aria-describedby={errors?.length ? `${id}-error` : undefined}>
      <legend className="mb-1 font-bold">{legend}</legend>
      {children}
      {errors?.length ? (
        <p id={`${id}-error`} className="text-sm font-bold text-danger">
          {errors.join(" ")}
        </p>
      ) : null}
    </fieldset>
  );
}
