import type { System } from "#shared/schemas/programme.ts";
import { formatInstant as formatInstantInZone, formatLongDate, formatShortDate } from "#shared/domain/locale-dates.ts";
import { ApiError } from "./api-client.ts";

/** `YYYY-MM-DD` → "3 Mar 2027" in the project's locale (decision 057); "—" when there is none. */
export function formatDate(d: string | null | undefined): string {
  if (!d) return "—";
  return formatShortDate(d.slice(0, 10));
}

/** `YYYY-MM-DD` → "3 March 2027": headlines and sentences on pages the public reads. */
export function formatDateLong(d: string | null | undefined): string {
  if (!d) return "—";
  return formatLongDate(d.slice(0, 10));
}

/**
 * Today's calendar date in a named time zone (the project's: the site's day, not the browser's,
 * so a lead in another zone sees the same "today" as the server), or the browser's own zone when
 * none is given.
 */
export function todayIn(timeZone?: string, now: Date = new Date()): string {
  // en-CA writes YYYY-MM-DD.
  return new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(now);
}

/** An instant in a named time zone (the project's), with the zone shown. */
export function formatInstant(iso: string | null | undefined, timeZone = "Europe/London"): string {
  if (!iso) return "—";
  return formatInstantInZone(iso, timeZone);
}

/** The programme's systems as people read them (in tags, filters and milestone lines). */
export const SYSTEM_WORD: Record<System, string> = {
  building: "Building",
  cooling: "Cooling",
  power: "Power",
  fuel: "Fuel",
  security: "Security",
  "fit-out": "Fit-out",
  commissioning: "Commissioning",
};

/** Money in minor units → "£12.4m" / "£850k" / "£1,200": investor figures are indicative, so compact. */
export function formatMoney(minor: number | null | undefined, currency: string | null | undefined): string {
  if (minor === null || minor === undefined || !Number.isFinite(minor)) return "—";
  const major = minor / 100;
  try {
    return new Intl.NumberFormat("en-GB", { style: "currency", currency: currency ?? "GBP", notation: Math.abs(major) >= 100_000 ? "compact" : "standard", maximumFractionDigits: Math.abs(major) >= 100_000 ? 1 : 0 }).format(major);
  } catch {
    return `${major.toFixed(0)} ${currency ?? ""}`.trim();
  }
}

/** "2.4 MB" / "380 KB": a file's size. */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
  return `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

export const ROLE_LABEL = { admin: "Administrator", lead: "Project lead", marketing: "Marketing", investor: "Investor" } as const;

/** Applies a server's field errors to a react-hook-form form. */
export function applyFieldErrors(fields: Record<string, string>, setError: (name: never, e: { message: string }) => void): void {
  for (const [name, message] of Object.entries(fields)) setError(name as never, { message });
}

/**
 * Shows a refused request in the form: the server's field errors beside their fields or, when it
 * names no field, its message beside `fallback` (when given). A failure that is not the server's
 * answer is left to the mutation cache.
 */
export function applyApiError(e: unknown, setError: (name: never, e: { message: string }) => void, fallback?: string): void {
  if (!(e instanceof ApiError)) return;
  if (Object.keys(e.fields).length) applyFieldErrors(e.fields, setError);
  else if (fallback !== undefined) applyFieldErrors({ [fallback]: e.message }, setError);
}
