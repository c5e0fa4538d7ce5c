import { createEvents, type EventAttributes } from "ics";
import { AppError } from "../core/app-error.ts";

/** One all-day date of a feed: a milestone's, a block's ready-for-service, a decision's needed-by. */
export interface CalendarEntry {
  /** Stable for the life of the thing it dates: `milestone-12@host`. */
  uid: string;
  /** YYYY-MM-DD: the forecast (or actual) date. */
  date: string;
  summary: string;
  description: string;
  url: string;
  /** How many times its date has changed so far (RFC 5545 §3.8.7.4). */
  sequence: number;
  lastModified: Date;
  categories: string[];
}

const PRODUCT_ID = "-//Plumbline//Milestone calendar//EN";
/** RFC 5545 §3.1: lines of no more than 75 octets, excluding the line break. */
const MAX_OCTETS = 75;

const dateParts = (date: string): [number, number, number] => {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return [y, m, d];
};

/** The day after a YYYY-MM-DD date: an all-day event's DTEND is exclusive (RFC 5545 §3.6.1). */
function nextDay(date: string): [number, number, number] {
  const next = new Date(Date.UTC(...(dateParts(date).map((n, i) => (i === 1 ? n - 1 : n)) as [number, number, number])) + 86_400_000);
  return [next.getUTCFullYear(), next.getUTCMonth() + 1, next.getUTCDate()];
}

/**
 * Folds one unfolded content line at 75 octets, never inside a UTF-8 character: the `ics`
 * package folds at 75 characters, which lets a line of accented or CJK text run past the
 * octet limit RFC 5545 §3.1 sets. Continuation lines begin with one space.
 */
export function foldLine(line: string): string {
  const parts: string[] = [];
  let current = "";
  let octets = 0;
  // The first line holds 75 octets; each continuation 74 after its leading space.
  let limit = MAX_OCTETS;
  for (const char of line) {
    const size = Buffer.byteLength(char, "utf8");
    if (octets + size > limit) {
      parts.push(current);
      current = "";
      octets = 0;
      limit = MAX_OCTETS - 1;
    }
    current += char;
    octets += size;
  }
  parts.push(current);
  return parts.join("\r\n ");
}

/**
 * The iCalendar text of a feed, written through the `ics` package (escaping, CRLF, DATE
 * values, DTSTAMP, SEQUENCE, LAST-MODIFIED), then refolded by octets (see `foldLine`).
 * `now` is the DTSTAMP: when this copy of the calendar was made.
 */
export function writeCalendar(name: string, entries: readonly CalendarEntry[], now: Date): string {
  const events = entries.map(
    (e) =>
      ({
        uid: e.uid,
        start: dateParts(e.date),
        end: nextDay(e.date),
        title: e.summary,
        description: e.description,
        url: e.url,
        sequence: e.sequence,
        lastModified: e.lastModified.getTime(),
        categories: e.categories,
        transp: "TRANSPARENT",
        // Not in the package's types, but in its schema: DTSTAMP, which otherwise reads the clock itself.
        timestamp: now.getTime(),
      }) as EventAttributes,
  );
  const { error, value } = createEvents(events, { productId: PRODUCT_ID, calName: name });
  if (error || value === null) throw new AppError("calendar_failed", `The calendar could not be written: ${error?.message ?? "no text"}.`, 500);
  // The package's own folds (CRLF and a tab) are undone before folding again by octets; escaped TEXT holds no raw line break.
  const lines = value.replace(/\r\n[\t ]/g, "").split("\r\n");
  return lines.map((l) => (l === "" ? l : foldLine(l))).join("\r\n");
}
