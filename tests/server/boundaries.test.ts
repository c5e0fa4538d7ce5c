/**
 * The house's module boundaries, checked over the source (decision 015): a table is named only in
 * its own module's repositories, and a repository is imported only by its own module. The same
 * import rule is an ESLint zone (eslint.config.js); this test holds both rules in `npm test`.
 *
 * Exempt: `server/seed/` (the demo seed writes the whole invented scenario in one place, as the
 * migrations create every table) and `server/db/` (the connection and the migration runner).
 */
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");
const EXEMPT_DIRS = new Set(["seed", "db"]);

/**
 * Which module owns each table. A table created by a new migration must be given an owner here
 * (the test below fails until it is).
 */
const OWNERS: Record<string, readonly string[]> = {
  audit: ["audit_events"],
  auth: ["sessions"],
  calendars: ["calendar_feeds"],
  budget: ["budget_changes", "budget_change_milestones", "budget_change_risks", "budget_events"],
  decisions: ["decisions", "decision_milestones", "decision_risks", "decision_documents", "decision_events"],
  digests: ["digest_runs", "digest_contents", "digest_deliveries"],
  documents: ["documents", "document_organisations", "document_versions", "document_views", "document_visits", "document_events"],
  enquiries: ["enquiries"],
  facility: ["capacity_blocks", "capacity_block_milestones", "plant_systems", "plant_system_blocks", "plant_system_milestones", "plant_units", "site_features", "facility_events"],
  mail: ["mail_messages", "mail_recipients"],
  media: ["media_items", "media_variants", "media_tags", "media_jobs", "media_usages"],
  posts: ["posts", "post_milestones", "post_tags", "post_media"],
  programme: ["phases", "milestones", "milestone_dependencies", "baselines", "milestone_events", "cost_actuals"],
  projects: ["projects"],
  reports: ["reports", "report_events", "report_notices"],
  risks: ["risks", "risk_mitigations", "risk_milestones", "risk_blocks", "risk_systems", "risk_events"],
  // Revisions, old addresses and workflow events of both kinds: the one publishing workflow (decision 023).
  publishing: ["publishing_events", "post_revisions", "post_slugs", "story_revisions", "story_slugs"],
  "rate-limit": ["rate_limit_hits", "sign_in_delays"],
  // Outside reviewers' links to one revision of a post or story, and their openings and answers (issue #15).
  "review-links": ["review_links", "review_link_events"],
  "site-plan": ["site_areas", "site_area_events"],
  stories: ["stories", "story_items"],
  subscribers: ["subscribers", "suppressions", "subscriber_mail_jobs"],
  // Investor organisations belong to accounts (decision 037).
  users: ["users", "invitations", "password_resets", "organisations"],
};
const ownerOf = new Map(Object.entries(OWNERS).flatMap(([module, tables]) => tables.map((t) => [t, module] as const)));

interface SourceFile {
  /** Path from the repository root, with forward slashes. */
  file: string;
  /** The directory under server/ (`""` for the wiring files in server/ itself). */
  module: string;
  source: ts.SourceFile;
}

function walk(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => (d.isDirectory() ? walk(path.join(dir, d.name)) : d.name.endsWith(".ts") ? [path.join(dir, d.name)] : []));
}

function serverFiles(): SourceFile[] {
  return walk(path.join(ROOT, "server"))
    .map((abs) => {
      const file = path.relative(ROOT, abs).split(path.sep).join("/");
      const parts = file.split("/");
      const module = parts.length > 2 ? parts[1]! : "";
      return { file, module, source: ts.createSourceFile(abs, readFileSync(abs, "utf8"), ts.ScriptTarget.ES2022, true) };
    })
    .filter((f) => !EXEMPT_DIRS.has(f.module));
}

const lineOf = (f: SourceFile, node: ts.Node) => f.source.getLineAndCharacterOfPosition(node.getStart(f.source)).line + 1;

/**
 * The tables a string names: the whole string as Knex takes a table (`"posts"`, `"posts as p"`), a
 * qualified column (`"posts.id"`), or raw SQL after FROM / JOIN / INTO / UPDATE / EXISTS. A string
 * that is a branch of a `?:` is prose ("milestones", "stories"), not a table.
 */
function tablesNamedIn(text: string): string[] {
  const found = new Set<string>();
  const whole = /^\s*`?([a-z][a-z0-9_]*)`?(?:\s+as\s+[a-z0-9_]+)?\s*$/i.exec(text) ?? /^([a-z][a-z0-9_]*)\.[a-z_*][a-z0-9_]*$/.exec(text);
  if (whole && ownerOf.has(whole[1]!)) found.add(whole[1]!);
  for (const m of text.matchAll(/\b(?:FROM|JOIN|INTO|UPDATE|EXISTS|TABLE)\s+`?([a-z][a-z0-9_]*)`?/g)) if (ownerOf.has(m[1]!)) found.add(m[1]!);
  return [...found];
}

function isProseBranch(node: ts.Node): boolean {
  const parent = node.parent;
  return ts.isConditionalExpression(parent) && (parent.whenTrue === node || parent.whenFalse === node);
}

/**
 * Outside a repository, a string given as an object's property (`{ plural: "posts" }`: a path word)
 * is a name, not a table, unless the property says it is one.
 */
function isNamingProperty(node: ts.Node, inRepository: boolean): boolean {
  const parent = node.parent;
  if (inRepository || !ts.isPropertyAssignment(parent) || parent.initializer !== node) return false;
  const key = ts.isIdentifier(parent.name) || ts.isStringLiteral(parent.name) ? parent.name.text : "";
  return !/^(table|from|into|join)$/i.test(key);
}

/** Every place a module's code names a table it does not own, or its own outside a repository. */
function tableViolations(files: SourceFile[]): string[] {
  const out: string[] = [];
  for (const f of files) {
    const inRepository = f.file.endsWith(".repository.ts");
    const visit = (node: ts.Node): void => {
      if ((ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node) || ts.isTemplateHead(node) || ts.isTemplateMiddle(node) || ts.isTemplateTail(node)) && !isProseBranch(node) && !isNamingProperty(node, inRepository)) {
        for (const table of tablesNamedIn(node.text)) {
          const owner = ownerOf.get(table)!;
          if (owner !== f.module) out.push(`${f.file}:${lineOf(f, node)} names "${table}", a table of server/${owner}: ask the ${owner} service`);
          else if (!inRepository) out.push(`${f.file}:${lineOf(f, node)} names "${table}" outside a repository: move the query to server/${owner}'s repository`);
        }
      }
      ts.forEachChild(node, visit);
    };
    visit(f.source);
  }
  return out.sort();
}

/** Every import (type-only ones too: they tie a module to another's rows) of a repository from outside its module. */
function repositoryImportViolations(files: SourceFile[]): string[] {
  const out: string[] = [];
  for (const f of files) {
    for (const statement of f.source.statements) {
      const specifier = (ts.isImportDeclaration(statement) || ts.isExportDeclaration(statement)) && statement.moduleSpecifier && ts.isStringLiteral(statement.moduleSpecifier) ? statement.moduleSpecifier.text : null;
      if (!specifier?.startsWith(".") || !specifier.endsWith(".repository.ts")) continue;
      const target = path.posix.normalize(path.posix.join(path.posix.dirname(f.file), specifier));
      const targetModule = target.split("/")[1]!;
      if (targetModule !== f.module) out.push(`${f.file}:${lineOf(f, statement)} imports ${target}: call server/${targetModule}'s service`);
    }
  }
  return out.sort();
}

describe("server module boundaries (decision 015)", () => {
  const files = serverFiles();

  it("finds the server's code to check (repositories, services, wiring)", () => {
    expect(files.some((f) => f.file === "server/digests/digests.repository.ts")).toBe(true);
    expect(files.some((f) => f.module === "")).toBe(true);
    expect(files.some((f) => f.module === "seed")).toBe(false);
  });

  it("every table the migrations create has exactly one owning module, and every owned table exists", () => {
    // Tables made by `createTable("x")`, and by the investor record's migration through its helpers: `events("x_events", …)`
    // and a loop over `["x_links", "y_id"]` pairs, each a link table named with its column (not a pair of columns of an index).
    const made = [/createTable\(\s*["'`]([a-z0-9_]+)["'`]/g, /\bevents\(\s*["'`]([a-z0-9_]+)["'`]/g, /(?<!index\(\s*)\[\s*["'`]([a-z0-9_]+(?<!_id))["'`],\s*["'`][a-z0-9_]+_id["'`]\s*\]/g];
    const created = new Set(walk(path.join(ROOT, "migrations")).flatMap((abs) => made.flatMap((re) => [...readFileSync(abs, "utf8").matchAll(re)].map((m) => m[1]!))));
    expect([...created].filter((t) => !ownerOf.has(t)).sort()).toEqual([]);
    expect([...ownerOf.keys()].filter((t) => !created.has(t)).sort()).toEqual([]);
    const all = Object.values(OWNERS).flat();
    expect(all.length).toBe(new Set(all).size);
  });

  it("the table check recognises the ways our code names a table, and not prose", () => {
    expect(tablesNamedIn("digest_deliveries")).toEqual(["digest_deliveries"]);
    expect(tablesNamedIn("subscribers as s")).toEqual(["subscribers"]);
    expect(tablesNamedIn("projects.id")).toEqual(["projects"]);
    expect(tablesNamedIn("d.id = (SELECT MAX(d2.id) FROM digest_deliveries d2 JOIN digest_runs r2 ON r2.id = d2.run_id)").sort()).toEqual(["digest_deliveries", "digest_runs"]);
    expect(tablesNamedIn("INSERT INTO rate_limit_hits (`key`, hits) VALUES (?, 1)")).toEqual(["rate_limit_hits"]);
    expect(tablesNamedIn("That project")).toEqual([]);
    expect(tablesNamedIn("/api/posts")).toEqual([]);
    expect(tablesNamedIn("remove it from milestones first")).toEqual([]);
  });

  it("a table is named only in its own module's repositories", () => {
    expect(tableViolations(files)).toEqual([]);
  });

  it("a repository is imported only by its own module", () => {
    expect(repositoryImportViolations(files)).toEqual([]);
  });
});
