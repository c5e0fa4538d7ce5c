import Papa from "papaparse";
import { z } from "zod";
import { EmailSchema } from "#shared/schemas/common.ts";
import {
  FrequencySchema,
  InterestSchema,
  SUBSCRIBER_EXPORT_COLUMNS,
  SUBSCRIBER_IMPORT_COLUMNS,
  SUBSCRIBER_IMPORT_MAX_ROWS,
  TopicRefSchema,
  type Frequency,
  type Interest,
  type Topics,
} from "#shared/schemas/subscribers.ts";
import { SystemSchema, type System } from "#shared/schemas/programme.ts";
import { foldLines, plainText } from "#shared/schemas/text.ts";
import type { SubscriberRecord } from "./subscribers.repository.ts";
import { normaliseTopics, parseTopicRef } from "./subscribers.topics.ts";

export interface ImportRow {
  line: number;
  email: string;
  name: string;
  organisation: string | null;
  interest: Interest;
  frequency: Frequency;
  topics: Topics | null;
  consent: { at: Date; source: string } | null;
}

export interface RowProblem {
  line: number;
  reason: string;
}

const REQUIRED = ["email", "name", "interest", "frequency"] as const;

/** A one-line cell: a line break a spreadsheet kept in the cell reads as a space; other control characters are refused. */
const cell = <T extends z.ZodType<unknown, string>>(schema: T) => z.string().transform(foldLines).pipe(schema);

const RowSchema = z.strictObject({
  email: EmailSchema,
  name: cell(plainText().min(1, "is required").max(200, "must be at most 200 characters")),
  organisation: cell(plainText().max(200, "must be at most 200 characters")).optional(),
  interest: z.string().trim().toLowerCase().pipe(InterestSchema),
  frequency: z.string().trim().toLowerCase().pipe(FrequencySchema),
  topics: cell(plainText().max(2000)).optional(),
  consent_at: cell(plainText()).optional(),
  consent_source: cell(plainText().max(200, "must be at most 200 characters")).optional(),
});

function describe(err: z.ZodError): string {
  return err.issues
    .map((i) => {
      const field = i.path.join(".") || "row";
      const message = i.code === "invalid_value" && "values" in i ? `must be one of ${(i.values as unknown[]).join(", ")}` : i.message;
      return `${field}: ${message}`;
    })
    .join("; ");
}

function parseTopics(cell: string | undefined, allowedAreas: ReadonlySet<string>): { topics: Topics | null } | { error: string } {
  const text = (cell ?? "").trim();
  if (text === "" || text.toLowerCase() === "all") return { topics: null };
  const areas: string[] = [];
  const systems: System[] = [];
  for (const raw of text.split(";").map((s) => s.trim()).filter(Boolean)) {
    if (!TopicRefSchema.safeParse(raw).success) return { error: `topics: "${raw}" must look like area:Hall 2A or system:${SystemSchema.options.join("|")}` };
    const ref = parseTopicRef(raw);
    if (ref.kind === "system") systems.push(ref.value as System);
    else if (!allowedAreas.has(ref.value)) return { error: `topics: "${ref.value}" is not an area of this project's public programme` };
    else areas.push(ref.value);
  }
  return { topics: normaliseTopics({ areas, systems }) };
}

function parseConsentTime(s: string, now: Date): Date | null {
  if (!z.iso.datetime({ offset: true }).safeParse(s).success && !z.iso.date().safeParse(s).success) return null;
  const d = new Date(s.length === 10 ? `${s}T00:00:00Z` : s);
  if (Number.isNaN(d.getTime()) || d > now || d.getUTCFullYear() < 1990) return null;
  return d;
}

/**
 * Reads a subscriber CSV and checks every row; the caller imports nothing when any row
 * has a problem. Line numbers are the file's own (the header is line 1), so a quoted
 * field that spans lines does not shift the rows after it.
 */
export function parseSubscriberCsv(csv: string, opts: { allowedAreas: ReadonlySet<string>; now: Date }): { rows: ImportRow[]; problems: RowProblem[] } {
  const text = csv.replace(/^\uFEFF/, "").replace(/\r\n?/g, "\n");
  const records: Array<{ line: number; cells: string[] }> = [];
  // A row begins where the previous one ended; its line is 1 + the line breaks before it.
  let rowStart = 0;
  let counted = 0;
  let breaks = 0;
  const parseErrors: RowProblem[] = [];
  Papa.parse<string[]>(text, {
    delimiter: ",",
    newline: "\n",
    skipEmptyLines: false,
    step: (result) => {
      for (let i = counted; i < rowStart; i++) if (text.charCodeAt(i) === 10) breaks++;
      counted = rowStart;
      const line = 1 + breaks;
      rowStart = result.meta.cursor;
      for (const e of result.errors) parseErrors.push({ line, reason: `the row cannot be read as CSV (${e.message})` });
      if (result.data.length === 1 && result.data[0]!.trim() === "") return; // an empty line
      records.push({ line, cells: result.data });
    },
  });
  const problems: RowProblem[] = [...parseErrors];
  const header = records.shift();
  if (!header) return { rows: [], problems: [{ line: 1, reason: "the file is empty; the first line must name the columns" }] };
  const columns = header.cells.map((c) => c.trim().toLowerCase());
  const unknown = columns.filter((c) => !(SUBSCRIBER_IMPORT_COLUMNS as readonly string[]).includes(c));
  const missing = REQUIRED.filter((c) => !columns.includes(c));
  const repeated = columns.filter((c, i) => columns.indexOf(c) !== i);
  if (unknown.length || missing.length || repeated.length) {
    const parts = [
      unknown.length ? `unknown columns ${unknown.map((c) => `"${c}"`).join(", ")}` : "",
      missing.length ? `missing columns ${missing.join(", ")}` : "",
      repeated.length ? `repeated columns ${repeated.join(", ")}` : "",
    ].filter(Boolean);
    return { rows: [], problems: [{ line: header.line, reason: `${parts.join("; ")} (the columns are ${SUBSCRIBER_IMPORT_COLUMNS.join(", ")})` }] };
  }
  if (records.length === 0) return { rows: [], problems: [{ line: header.line, reason: "the file has no rows under the header" }] };
  if (records.length > SUBSCRIBER_IMPORT_MAX_ROWS) {
    return { rows: [], problems: [{ line: header.line, reason: `the file has ${records.length} rows; import at most ${SUBSCRIBER_IMPORT_MAX_ROWS} at a time` }] };
  }

  const rows: ImportRow[] = [];
  const seen = new Map<string, number>();
  for (const { line, cells } of records) {
    if (cells.length !== columns.length) {
      problems.push({ line, reason: `has ${cells.length} cells; the header has ${columns.length}` });
      continue;
    }
    const obj: Record<string, string> = {};
    columns.forEach((c, i) => {
      if (cells[i]!.trim() !== "") obj[c] = cells[i]!;
    });
    const parsed = RowSchema.safeParse(obj);
    if (!parsed.success) {
      problems.push({ line, reason: describe(parsed.error) });
      continue;
    }
    const v = parsed.data;
    const reasons: string[] = [];
    const t = parseTopics(v.topics, opts.allowedAreas);
    if ("error" in t) reasons.push(t.error);
    let consent: ImportRow["consent"] = null;
    if (Boolean(v.consent_at) !== Boolean(v.consent_source)) {
      reasons.push("consent_at and consent_source go together: give both (the time and where consent was collected) or neither");
    } else if (v.consent_at && v.consent_source) {
      const at = parseConsentTime(v.consent_at, opts.now);
      if (!at) reasons.push("consent_at: must be a past date or timestamp in ISO 8601, e.g. 2026-09-12T14:30:00Z");
      else consent = { at, source: v.consent_source };
    }
    const first = seen.get(v.email);
    if (first !== undefined) reasons.push(`email: ${v.email} is also on line ${first}`);
    else seen.set(v.email, line);
    if (reasons.length) {
      problems.push({ line, reason: reasons.join("; ") });
      continue;
    }
    rows.push({
      line,
      email: v.email,
      name: v.name,
      organisation: v.organisation || null,
      interest: v.interest,
      frequency: v.frequency,
      topics: "topics" in t ? t.topics : null,
      consent,
    });
  }
  problems.sort((a, b) => a.line - b.line);
  return { rows, problems };
}

/** A spreadsheet would run a cell that begins like a formula; a leading apostrophe keeps it text. */
function cellSafe(s: string | null): string {
  if (!s) return "";
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

export function topicsCell(t: Topics | null): string {
  if (!t) return "all";
  return [...t.areas.map((a) => `area:${a}`), ...t.systems.map((s) => `system:${s}`)].join(";");
}

/** The site office's export, one row per subscriber, in SUBSCRIBER_EXPORT_COLUMNS order. */
export function subscribersToCsv(rows: SubscriberRecord[]): string {
  const data = rows.map((s) => [
    s.email,
    cellSafe(s.name),
    cellSafe(s.organisation),
    s.interest,
    s.frequency,
    topicsCell(s.topics),
    s.status,
    s.audience,
    s.consentAt?.toISOString() ?? "",
    cellSafe(s.consentSource),
    s.consentVersion ?? "",
    s.confirmedAt?.toISOString() ?? "",
    s.lastDigestAt?.toISOString() ?? "",
    s.createdAt.toISOString(),
  ]);
  return Papa.unparse({ fields: [...SUBSCRIBER_EXPORT_COLUMNS], data }, { newline: "\r\n" }) + "\r\n";
}
