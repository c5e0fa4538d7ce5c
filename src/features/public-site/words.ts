import type { MilestoneSnapshot, PostTag } from "#shared/schemas/posts.ts";
import { formatDayOfInstant, formatMonthYear } from "#shared/domain/locale-dates.ts";
import { formatDateLong, SYSTEM_WORD } from "../../lib/format.ts";


/** "3 March 2027" for a calendar date `YYYY-MM-DD` (never shifted by the reader's zone). */
export function longDate(date: string | null | undefined): string {
  return formatDateLong(date);
}

/** "March 2027" for `YYYY-MM` or `YYYY-MM-DD`. */
export function monthWords(month: string): string {
  return formatMonthYear(month);
}

/** "3 March 2027" for an instant, as the day it was on the site (the project's zone). */
export function dayOf(iso: string | null | undefined, timeZone: string): string {
  if (!iso) return "—";
  return formatDayOfInstant(iso, timeZone);
}

/**
 * The day a photo was taken, from the camera's local time (`YYYY-MM-DDTHH:MM:SS`): the
 * camera's clock is the site's, so the date part is read as it is, with no zone applied.
 */
export function capturedOn(takenAt: string | null | undefined): string | null {
  if (!takenAt || !/^\d{4}-\d{2}-\d{2}/.test(takenAt)) return null;
  return longDate(takenAt.slice(0, 10));
}

/** A tag as a person reads it: areas as named, systems capitalised, blocks and plant systems by their names. */
export function tagWord(tag: PostTag & { name?: string }): string {
  if (tag.kind === "block" || tag.kind === "plant") return tag.name ?? (tag.kind === "block" ? "Capacity block" : "Plant system");
  return tag.kind === "system" ? ((SYSTEM_WORD as Record<string, string>)[tag.value] ?? tag.value) : tag.value;
}

/** Where the updates with a tag are listed: blocks and plant systems by id, the rest by topic. */
export function tagFilter(tag: PostTag): string {
  return tag.kind === "block" || tag.kind === "plant" ? `${tag.kind}=${encodeURIComponent(tag.value)}` : `tag=${encodeURIComponent(tag.value)}`;
}

/** The systems the programme knows, for the tag filter (areas come from the posts themselves). */
export const SYSTEM_TAGS = Object.keys(SYSTEM_WORD);

/** The date that matters in a snapshot: the actual finish once done, else the forecast (else the baseline). */
export function snapshotDate(s: MilestoneSnapshot): { word: string; date: string | null } {
  if (s.actualFinish) return { word: "Finished", date: s.actualFinish };
  return { word: "Forecast", date: s.forecastFinish ?? s.baselineFinish };
}
