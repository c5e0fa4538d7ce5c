import { forwardRef, useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from "react";

/** What every field says around its control: the label, a hint, and an error that replaces the hint. */
interface FieldWords {
  label: string;
  error?: string;
  hint?: ReactNode;
}

function FieldShell({ label, error, hint, id, children }: FieldWords & { id: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      {hint && !error ? (
        <p id={`${id}-hint`} className="text-xs text-ink-faint">
          {hint}
        </p>
      ) : null}
      <FieldError id={`${id}-error`} error={error} />
    </div>
  );
}

/** A field's error as every form shows it: the mark and the message, announced when it appears. `id` is what the control's `aria-describedby` names. */
export function FieldError({ id, error }: { id: string; error?: string }) {
  if (!error) return null;
  return (
    <p id={id} role="alert" className="flex items-start gap-1 text-sm text-bad">
      <span aria-hidden>▲</span>
      {error}
    </p>
  );
}

/** The id a control is labelled by: its own, or one made for it. */
function useFieldId(id: string | undefined): string {
  const auto = useId();
  return id ?? auto;
}

const control =
  "w-full rounded-sm border bg-sheet px-3 py-2 text-[0.95rem] text-ink placeholder:text-ink-faint focus:border-ink aria-[invalid=true]:border-bad";

/** What every control carries: its id, whether it is invalid, and its look. */
function controlProps(fid: string, error: string | undefined, className: string) {
  return { id: fid, "aria-invalid": error ? true : undefined, className: `${control} border-rule-strong ${className}` };
}

export type TextFieldProps = InputHTMLAttributes<HTMLInputElement> & FieldWords;

export const TextField = forwardRef<HTMLInputElement, TextFieldProps>(function TextField({ label, error, hint, id, className = "", ...rest }, ref) {
  const fid = useFieldId(id);
  return (
    <FieldShell label={label} error={error} hint={hint} id={fid}>
      <input ref={ref} {...controlProps(fid, error, className)} aria-describedby={error ? `${fid}-error` : hint ? `${fid}-hint` : undefined} {...rest} />
    </FieldShell>
  );
});

/** The choices of a select, each shown by its label. */
export function SelectOptions({ options }: { options: ReadonlyArray<{ value: string; label: string }> }) {
  return options.map((o) => (
    <option key={o.value} value={o.value}>
      {o.label}
    </option>
  ));
}

export type SelectFieldProps = SelectHTMLAttributes<HTMLSelectElement> & FieldWords & { options: ReadonlyArray<{ value: string; label: string }> };

export const SelectField = forwardRef<HTMLSelectElement, SelectFieldProps>(function SelectField({ label, error, hint, id, options, className = "", ...rest }, ref) {
  const fid = useFieldId(id);
  return (
    <FieldShell label={label} error={error} hint={hint} id={fid}>
      <select ref={ref} {...controlProps(fid, error, className)} {...rest}>
        <SelectOptions options={options} />
      </select>
    </FieldShell>
  );
});

export type TextAreaFieldProps = TextareaHTMLAttributes<HTMLTextAreaElement> & FieldWords;

export const TextAreaField = forwardRef<HTMLTextAreaElement, TextAreaFieldProps>(function TextAreaField({ label, error, hint, id, className = "", ...rest }, ref) {
  const fid = useFieldId(id);
  return (
    <FieldShell label={label} error={error} hint={hint} id={fid}>
      <textarea ref={ref} {...controlProps(fid, error, className)} {...rest} />
    </FieldShell>
  );
});
