/**
 * Dates are put into words in one place (decision 057): `src/shared/domain/locale-dates.ts`, which
 * takes every month and day name from Intl (CLDR) in the project's locale. Checked over the source,
 * so that a page, an e-mail and a PDF cannot drift apart again: before this check the pages wrote
 * "14 Sept 2026" (en-GB's CLDR form) while digests, the facility record and the monthly report's
 * PDF wrote "14 Sep 2026" from month lists of their own.
 *
 * Exempt: the demo seed (`server/seed/`), which names its invented months in its own texts.
 */
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");
const HOME = "src/shared/domain/locale-dates.ts";

function walk(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => (d.isDirectory() ? walk(path.join(dir, d.name)) : /\.tsx?$/.test(d.name) ? [path.join(dir, d.name)] : []));
}

const sources = () =>
  ["src", "server"]
    .flatMap((top) => walk(path.join(ROOT, top)))
    .map((abs) => ({ file: path.relative(ROOT, abs).split(path.sep).join("/"), text: readFileSync(abs, "utf8") }))
    .filter((f) => f.file !== HOME && !f.file.startsWith("server/seed/"));

/** A list of month names written out ("Jan", "Feb" … or "January", "February" …). */
const MONTH_LIST = /["'`](?:Jan|January)["'`]\s*,\s*["'`](?:Feb|February)["'`]/;
/** A date pattern with a month name in it, handed to luxon (`toFormat("d LLLL yyyy")`). */
const LUXON_MONTH_WORDS = /toFormat\(\s*["'`][^"'`]*LLL/;
/** A formatter of month names made outside the one module (`{ month: "short" | "long" }`). */
const INTL_MONTH_WORDS = /DateTimeFormat\([^)]*month:\s*["'](?:short|long)["']/;
/** A date put into words by `toLocaleString` and its kin. */
const LOCALE_STRING_DATES = /toLocale(?:Date|Time)?String\([^)]*(?:dateStyle|month)/;

function offenders(pattern: RegExp): string[] {
  return sources()
    .flatMap((f) => f.text.split("\n").map((line, i) => ({ at: `${f.file}:${i + 1}`, line })))
    .filter(({ line }) => pattern.test(line))
    .map(({ at, line }) => `${at}: ${line.trim()}`);
}

describe("dates in words come from one module (decision 057)", () => {
  it("reads the code it checks: both trees, hundreds of files", () => {
    expect(sources().length).toBeGreaterThan(300);
  });

  it("the patterns find what they look for, and not their neighbours", () => {
    expect(MONTH_LIST.test(`const M = ["Jan", "Feb", "Mar"];`)).toBe(true);
    expect(MONTH_LIST.test(`const M = ['January', 'February'];`)).toBe(true);
    expect(MONTH_LIST.test(`expect(x).toBe("Jan");`)).toBe(false);
    expect(LUXON_MONTH_WORDS.test(`d.toFormat("d LLLL yyyy")`)).toBe(true);
    expect(LUXON_MONTH_WORDS.test(`d.toFormat("yyyy-LL")`)).toBe(false);
    expect(INTL_MONTH_WORDS.test(`new Intl.DateTimeFormat("en-GB", { month: "short", year: "2-digit" })`)).toBe(true);
    expect(INTL_MONTH_WORDS.test(`new Intl.DateTimeFormat("en-CA", { year: "numeric", month: "2-digit", day: "2-digit" })`)).toBe(false);
    expect(LOCALE_STRING_DATES.test(`new Date(iso).toLocaleDateString("en-GB", { dateStyle: "medium", timeZone })`)).toBe(true);
    expect(LOCALE_STRING_DATES.test(`total.toLocaleString("en-GB")`)).toBe(false);
  });

  it("no list of month names outside the one module", () => {
    expect(offenders(MONTH_LIST)).toEqual([]);
  });

  it("no luxon pattern that writes a month's name", () => {
    expect(offenders(LUXON_MONTH_WORDS)).toEqual([]);
  });

  it("no Intl formatter of month names outside the one module", () => {
    expect(offenders(INTL_MONTH_WORDS)).toEqual([]);
  });

  it("no date put into words by toLocaleString or its kin", () => {
    expect(offenders(LOCALE_STRING_DATES)).toEqual([]);
  });
});
