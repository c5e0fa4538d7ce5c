import Papa from "papaparse";
import {
  MILESTONE_CSV_COLUMNS,
  MILESTONE_FIELD_NAMES,
  MILESTONE_FIELDS,
  MilestoneCreateInputSchema,
  milestoneColumn,
  type MilestoneCreateInput,
  type MilestoneCsvColumn,
  type MilestoneFieldKind,
  type MilestoneFieldName,
  type MilestoneFieldValues,
} from "#shared/schemas/programme.ts";
import { foldLines } from "#shared/schemas/text.ts";

/**
 * Milestones as CSV (papaparse): export, and the first stage of import — reading the
 * file and checking each row on its own with the same zod schema the create route
 * uses. Checks that need the stored programme (ids, names, dependencies, dates
 * against today) are the service's.
 */

export type { MilestoneCsvColumn };
type Column = MilestoneCsvColumn;

const REQUIRED: readonly Column[] = ["name", "phase", "system", "weight", "baseline_finish", "audience"];

/** A milestone as export writes it: its id and every field. */
export type CsvMilestoneExport = { id: number } & MilestoneFieldValues;

/** A field's value as a cell: nothing for none, ids joined by `;`. */
function toCell(value: unknown): string {
  if (value === null || value === undefined) return "";
  return Array.isArray(value) ? value.join(";") : String(value);
}

/** The field each column (but `id`) carries. */
const FIELD_OF_COLUMN = new Map<string, MilestoneFieldName>(MILESTONE_FIELD_NAMES.map((f) => [milestoneColumn(f), f]));

/**
 * The milestones as CSV in MILESTONE_CSV_COLUMNS order, CRLF line ends (RFC 4180).
 * Cells that a spreadsheet would run as a formula (=, +, -, @ first) are written
 * with a leading apostrophe, which import removes again.
 */
export function milestonesToCsv(milestones: readonly CsvMilestoneExport[]): string {
  const data = milestones.map((m) => MILESTONE_CSV_COLUMNS.map((c) => toCell(c === "id" ? m.id : m[FIELD_OF_COLUMN.get(c)!])));
  return `${Papa.unparse({ fields: [...MILESTONE_CSV_COLUMNS], data }, { escapeFormulae: true, newline: "\r\n" })}\r\n`;
}

/** A row that passed the per-row checks. */
export interface CsvMilestoneRow {
  /** Line of the file where the row begins (the header is line 1). */
  line: number;
  id: number | null;
  input: Omit<MilestoneCreateInput, "dependsOn">;
  /** Dependency references as written: ids (all digits) or milestone names; null when the file has no depends_on column. */
  dependsOn: string[] | null;
  /** The columns the file has: an update leaves the other fields as they are. */
  columns: ReadonlySet<Column>;
}

export interface CsvProblem {
  line: number;
  reason: string;
}

export interface ParsedCsv {
  rows: CsvMilestoneRow[];
  problems: CsvProblem[];
}

function unescapeFormula(cell: string): string {
  return /^'[=+\-@\t\r]/.test(cell) ? cell.slice(1) : cell;
}

function countNewlines(text: string, from: number, end: number): number {
  let n = 0;
  for (let i = from; i < end; i += 1) if (text.charCodeAt(i) === 10) n += 1;
  return n;
}

/** A number cell: empty → undefined (so the schema says what is missing or applies its default). */
function numberCell(cell: string): number | undefined {
  return cell.trim() === "" ? undefined : Number(cell.trim());
}

/**
 * A cell as its field's kind reads it, before the schema checks it; undefined when the file has
 * no such column (an update then keeps the stored value) or, for a code or number, when the cell
 * is empty (the schema then says what is missing or applies its default).
 */
function fromCell(kind: MilestoneFieldKind, cell: string | undefined): unknown {
  if (cell === undefined) return undefined;
  switch (kind) {
    case "line":
      // One-line columns: a line break a spreadsheet kept in the cell reads as a space.
      return foldLines(cell);
    case "text":
      return cell;
    case "code":
      return cell.trim() === "" ? undefined : cell.trim();
    case "number":
      return numberCell(cell);
    case "optional-number":
      return cell.trim() === "" ? null : numberCell(cell);
    case "optional-date":
      return cell.trim() === "" ? null : cell.trim();
    case "ids":
      // Ids or names, resolved against the stored programme by the import.
      return undefined;
  }
}

/**
 * Reads a milestones CSV and checks every row with MilestoneCreateInputSchema. Each
 * problem names its line (where the row begins, counting the header as line 1) and
 * the column. Blank lines are skipped.
 */
export function parseMilestoneCsv(text: string): ParsedCsv {
  const source = text.startsWith("\uFEFF") ? text.slice(1) : text;
  const records: Array<{ line: number; cells: string[]; errors: string[] }> = [];
  // papaparse reports where each row ends; a row begins where the previous one ended, and
  // its line is one more than the newlines before that point (quoted cells may hold newlines).
  let cursor = 0;
  let counted = 0;
  let newlinesBefore = 0;
  Papa.parse<string[]>(source, {
    header: false,
    skipEmptyLines: false,
    step: (result) => {
      const start = cursor;
      newlinesBefore += countNewlines(source, counted, start);
      counted = start;
      cursor = result.meta.cursor;
      const cells = result.data;
      if (cells.length === 1 && (cells[0] ?? "").trim() === "") return;
      records.push({ line: newlinesBefore + 1, cells, errors: result.errors.map((e) => e.message) });
    },
  });

  const problems: CsvProblem[] = [];
  const header = records.shift();
  if (!header) return { rows: [], problems: [{ line: 1, reason: "the file is empty: the first line must name the columns" }] };
  const names = header.cells.map((c) => c.trim().toLowerCase());
  const known = new Set<string>(MILESTONE_CSV_COLUMNS);
  const unknown = names.filter((n) => !known.has(n));
  const missing = REQUIRED.filter((c) => !names.includes(c));
  const repeated = names.filter((n, i) => names.indexOf(n) !== i);
  if (unknown.length > 0 || missing.length > 0 || repeated.length > 0) {
    const parts: string[] = [];
    if (missing.length > 0) parts.push(`missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}`);
    if (unknown.length > 0) parts.push(`unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")} (the columns are ${MILESTONE_CSV_COLUMNS.join(", ")})`);
    if (repeated.length > 0) parts.push(`column${repeated.length > 1 ? "s" : ""} ${[...new Set(repeated)].join(", ")} given twice`);
    return { rows: [], problems: [{ line: header.line, reason: parts.join("; ") }] };
  }
  const columns = new Set(names as Column[]);
  if (records.length === 0) return { rows: [], problems: [{ line: header.line + 1, reason: "the file has no milestone rows" }] };

  const rows: CsvMilestoneRow[] = [];
  for (const record of records) {
    if (record.cells.length !== names.length) {
      problems.push({ line: record.line, reason: `has ${record.cells.length} cells where the header has ${names.length}` });
      continue;
    }
    if (record.errors.length > 0) {
      problems.push({ line: record.line, reason: record.errors.join("; ") });
      continue;
    }
    const cell = (c: Column): string | undefined => {
      const i = names.indexOf(c);
      return i === -1 ? undefined : unescapeFormula(record.cells[i] ?? "");
    };
    const reasons: string[] = [];
    let id: number | null = null;
    const idCell = cell("id")?.trim() ?? "";
    if (idCell !== "") {
      if (/^\d+$/.test(idCell) && Number(idCell) > 0 && Number.isSafeInteger(Number(idCell))) id = Number(idCell);
      else reasons.push("id must be a whole number (or empty for a new milestone)");
    }
    const candidate = Object.fromEntries(MILESTONE_FIELD_NAMES.map((f) => [f, fromCell(MILESTONE_FIELDS[f].kind, cell(milestoneColumn(f)))]));
    const parsed = MilestoneCreateInputSchema.safeParse(candidate);
    if (!parsed.success) {
      const seen = new Set<string>();
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0] ?? "row");
        const column = field in MILESTONE_FIELDS ? milestoneColumn(field as MilestoneFieldName) : field;
        if (seen.has(column)) continue;
        seen.add(column);
        reasons.push(`${column} ${issue.message}`);
      }
    }
    if (reasons.length > 0 || !parsed.success) {
      problems.push({ line: record.line, reason: reasons.join("; ") });
      continue;
    }
    const { dependsOn: _none, ...input } = parsed.data;
    const depsCell = cell("depends_on");
    rows.push({
      line: record.line,
      id,
      input,
      dependsOn: depsCell === undefined ? null : depsCell.split(";").map((s) => s.trim()).filter((s) => s !== ""),
      columns,
    });
  }
  return { rows, problems };
}
