import type { FormEvent } from "react";
import type { FieldValues, Path, UseFormReturn, UseFormSetError } from "react-hook-form";
import { toast } from "sonner";
import { ApiError } from "./api-client.ts";
import { applyApiError, applyFieldErrors } from "./format.ts";

/** Options of a select from a word map: `{ value, label }` in the map's order. */
export function optionsOf<K extends string>(words: Record<K, string>, only?: readonly K[]) {
  return (only ?? (Object.keys(words) as K[])).map((k) => ({ value: k, label: words[k] }));
}

/**
 * The named fields of `source`, and only those: a form's values read from the record it edits,
 * e.g. `{ ...pick(block, ["name", "racks"]), dependsOn: block.dependsOn }`.
 */
export function pick<A extends object, K extends keyof A>(source: A, keys: readonly K[]): Pick<A, K> {
  const picked = {} as Pick<A, K>;
  for (const key of keys) picked[key] = source[key];
  return picked;
}

/** An `<input type="number">`'s text as a number, or null when left empty (optional figures). */
export const numberOrNull = (v: unknown) => (v === "" || v === null || v === undefined ? null : Number(v));

/**
 * The fields of `values` that differ from `before`, as a PATCH body with the version read.
 * Arrays and objects compare by content, so an untouched list is not sent.
 */
export function changedFields<T extends Record<string, unknown>>(before: Record<string, unknown>, values: T, version: number): Partial<T> & { version: number } {
  const patch: Record<string, unknown> = { version };
  for (const [key, value] of Object.entries(values)) {
    if (JSON.stringify(value) !== JSON.stringify(before[key])) patch[key] = value;
  }
  return patch as Partial<T> & { version: number };
}

/**
 * Sends a form's write and shows what went wrong beside the fields: a 409 says someone else
 * saved first (the page has been read again, so reopening shows their version), field errors
 * go to their fields, anything else to the form as a whole. True when it saved.
 */
export async function saveForm<V extends FieldValues>(setError: UseFormSetError<V>, write: () => Promise<unknown>, done: string): Promise<boolean> {
  try {
    await write();
    toast.success(done);
    return true;
  } catch (e) {
    if (e instanceof ApiError && e.status === 409) {
      setError("root", { message: "Someone else saved this while you were editing. Close and open it again to see their version, then make your change." });
    } else if (e instanceof ApiError && Object.keys(e.fields).length > 0) {
      applyFieldErrors(e.fields, setError);
    } else {
      setError("root", { message: e instanceof Error ? e.message : "The change could not be saved." });
    }
    return false;
  }
}

/**
 * A form's submit handler: `send` runs with the checked values; a refusal from the server goes to
 * the fields it names, or else beside `fallback` (when given). Any other failure is left to the
 * mutation cache, which reports it.
 */
export function submitting<TF extends FieldValues, TT>(form: UseFormReturn<TF, unknown, TT>, send: (values: TT) => Promise<unknown>, fallback?: Path<TF>) {
  return form.handleSubmit(async (values) => {
    try {
      await send(values);
    } catch (e) {
      applyApiError(e, form.setError, fallback);
    }
  });
}

/** The submit handler of a plain form (no form library): the page stays, and `act` runs. */
export const onSubmitted =
  (act: () => void) =>
  (e: FormEvent): void => {
    e.preventDefault();
    act();
  };
