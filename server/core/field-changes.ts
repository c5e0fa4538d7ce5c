import { AppError } from "./app-error.ts";

/**
 * What the investor record's modules (risks, decisions) share when they write: a stored value as
 * an event holds it, one event per changed field, the changes for the audit entry, and the two
 * refusals every write makes (a 422 naming its fields, a 409 on a stale version).
 */

/** The longest value an event column holds (`from_value`, `to_value`: 500 characters). */
const EVENT_VALUE_CHARS = 500;

/** A value as an event holds it: text as is, the rest as JSON; long text cut, marked with an ellipsis. */
export function eventValue(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  const text = typeof v === "string" ? v : typeof v === "number" || typeof v === "boolean" ? String(v) : JSON.stringify(v);
  return text.length > EVENT_VALUE_CHARS ? `${text.slice(0, EVENT_VALUE_CHARS - 1)}…` : text;
}

export interface FieldChange {
  field: string;
  from: string | null;
  to: string | null;
}

/** One change per field of `next` whose value differs from `before` (arrays and objects compared by their JSON). */
export function changedFields(before: Record<string, unknown>, next: Record<string, unknown>): FieldChange[] {
  return Object.keys(next)
    .filter((field) => JSON.stringify(before[field]) !== JSON.stringify(next[field]))
    .map((field) => ({ field, from: eventValue(before[field]), to: eventValue(next[field]) }));
}

/** Each changed field as { from, to }, for the audit entry of an edit. */
export function changeDetail(before: Record<string, unknown>, next: Record<string, unknown>): Record<string, { from: unknown; to: unknown }> {
  const out: Record<string, { from: unknown; to: unknown }> = {};
  for (const key of Object.keys(next)) {
    if (JSON.stringify(before[key]) !== JSON.stringify(next[key])) out[key] = { from: before[key], to: next[key] };
  }
  return out;
}

/** A 422 naming each field and what is wrong with it. */
export function invalidFields(fields: Record<string, string>, code: string): AppError {
  const message = Object.entries(fields)
    .map(([field, problem]) => `${field} ${problem}`)
    .join("; ");
  return new AppError(code, `Check ${message}.`, 422, fields);
}

/** 409 with the stored values attached, so the caller can apply their change to them. */
export function staleVersion(noun: string, current: unknown): AppError {
  return new AppError("conflict", `Someone else changed this ${noun} after you loaded it. The current values are attached; apply your change to them.`, 409, undefined, { current });
}

/** Ids once each, ascending. */
export const uniqueSorted = (ids: readonly number[]): number[] => [...new Set(ids)].sort((x, y) => x - y);
