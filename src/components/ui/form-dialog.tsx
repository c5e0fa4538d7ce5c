import { useId, useState, type FormEvent, type ReactNode } from "react";
import { Controller, type Control, type FieldPath, type FieldValues } from "react-hook-form";
import { Button } from "./button.tsx";
import { Dialog } from "./dialog.tsx";
import { FieldError } from "./field.tsx";

/** Ticks for choosing ids (milestones a block depends on, risks a decision is linked to). */
export function IdPicks({ legend, options, value, onChange, error, empty }: { legend: string; options: ReadonlyArray<{ id: number; label: string; hint?: string }>; value: readonly number[]; onChange: (v: number[]) => void; error?: string; empty: string }) {
  const id = useId();
  return (
    <fieldset className="flex flex-col gap-1" aria-describedby={error ? `${id}-error` : undefined}>
      <legend className="text-sm font-medium">{legend}</legend>
      {options.length === 0 ? (
        <p className="text-sm text-ink-faint">{empty}</p>
      ) : (
        <div className="flex max-h-44 flex-col gap-1 overflow-y-auto border border-rule bg-paper p-2">
          {options.map((o) => {
            const on = value.includes(o.id);
            return (
              <label key={o.id} className="inline-flex items-start gap-2 text-sm">
                <input type="checkbox" className="mt-1" checked={on} onChange={() => onChange(on ? value.filter((x) => x !== o.id) : [...value, o.id])} />
                <span>
                  {o.label}
                  {o.hint ? <span className="ml-1 text-xs text-ink-faint">{o.hint}</span> : null}
                </span>
              </label>
            );
          })}
        </div>
      )}
      <FieldError id={`${id}-error`} error={error} />
    </fieldset>
  );
}

/** `IdPicks` bound to a react-hook-form field of ids: its value, its changes and its error. */
export function IdPicksField<V extends FieldValues>({ control, name, ...picks }: { control: Control<V>; name: FieldPath<V>; legend: string; options: ReadonlyArray<{ id: number; label: string; hint?: string }>; empty: string }) {
  return <Controller control={control} name={name} render={({ field, fieldState }) => <IdPicks {...picks} value={(field.value as number[] | null | undefined) ?? []} onChange={field.onChange} error={fieldState.error?.message} />} />;
}

/**
 * An editor of one record in a dialog: its fields, the form's own error, save and (for an
 * existing row) delete. `after` is shown below the form, outside it (a form of its own, a history).
 */
export function FormDialog({ title, onClose, onSubmit, busy, rootError, onDelete, deleting, children, after, submitLabel = "Save" }: { title: string; onClose: () => void; onSubmit: (e: FormEvent) => void; busy: boolean; rootError?: string; onDelete?: () => void; deleting?: boolean; children: ReactNode; after?: ReactNode; submitLabel?: string }) {
  const formId = useId();
  // Deleting asks twice: the first press only arms the button.
  const [armed, setArmed] = useState(false);
  return (
    <Dialog
      open
      title={title}
      onClose={onClose}
      dismiss="Cancel"
      wide
      footer={
        <>
          {onDelete ? (
            <Button variant="danger" onClick={armed ? onDelete : () => setArmed(true)} busy={deleting}>
              {armed ? "Delete for good" : "Delete…"}
            </Button>
          ) : null}
          <Button type="submit" form={formId} variant="primary" busy={busy}>
            {submitLabel}
          </Button>
        </>
      }
    >
      <form id={formId} onSubmit={onSubmit} noValidate className="grid gap-3 sm:grid-cols-2" aria-label={title}>
        {children}
        {rootError ? (
          <div className="sm:col-span-2">
            <FieldError id={`${formId}-root`} error={rootError} />
          </div>
        ) : null}
      </form>
      {after}
    </Dialog>
  );
}
