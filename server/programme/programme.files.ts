import type { Project } from "#shared/schemas/projects.ts";
import { milestoneColumn, type CsvImportResult } from "#shared/schemas/programme.ts";
import { findCycle } from "#shared/domain/programme-dependencies.ts";
import { AppError } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import { cycleWords, eventsFor, fieldsOf, sameIds, storedValuesOf, uniqueSorted, type ProgrammeContext, type StoredValues, type Trx } from "./programme.context.ts";
import { milestonesToCsv, parseMilestoneCsv, type CsvMilestoneRow } from "./programme.csv.ts";
import { insertEvents } from "./programme.events.repository.ts";
import { findOrCreatePhase, insertMilestone, listDependencyEdges, listMilestones, replaceDependencies, type MilestoneFields, type MilestoneRecord } from "./programme.repository.ts";

/**
 * The programme as a CSV file: export every milestone, and import a file that adds and updates
 * milestones in one transaction, all rows checked first so a bad row writes nothing.
 * Reading and writing the format is programme.csv.ts.
 */
export function createFileUseCases(ctx: ProgrammeContext) {
  const { db, projects, now, record, writeUpdate, touch } = ctx;

  interface ImportPlan {
    line: number;
    /** The stored milestone's id, or −line for a new one. */
    key: number;
    target: MilestoneRecord | null;
    phase: string;
    next: MilestoneFields;
    /** Keys of predecessors; null when the file has no depends_on column. */
    dependsOn: number[] | null;
    dependenciesChange: boolean;
  }

  /** Every check of an import, on every row; throws `csv_invalid` listing each bad row, so nothing is written. */
  async function planImport(trx: Trx, project: Project, existing: readonly MilestoneRecord[], parsed: ReturnType<typeof parseMilestoneCsv>): Promise<ImportPlan[]> {
    const today = projects.today(project);
    const problems = new Map<number, string[]>();
    const add = (line: number, reason: string) => {
      const list = problems.get(line);
      if (list) list.push(reason);
      else problems.set(line, [reason]);
    };
    for (const p of parsed.problems) add(p.line, p.reason);

    const byId = new Map(existing.map((m) => [m.id, m]));
    const removedIds = new Set((await listMilestones(trx, project.id, "staff", { removed: "only" })).map((m) => m.id));
    const byName = new Map<string, MilestoneRecord[]>();
    for (const m of existing) byName.set(m.name, [...(byName.get(m.name) ?? []), m]);

    const claimed = new Map<number, number>();
    const resolved: Array<{ row: CsvMilestoneRow; target: MilestoneRecord | null; key: number }> = [];
    for (const row of parsed.rows) {
      let target: MilestoneRecord | null = null;
      if (row.id !== null) {
        target = byId.get(row.id) ?? null;
        if (!target) {
          add(
            row.line,
            removedIds.has(row.id)
              ? `id ${row.id} was removed from the programme (restore it first, or leave id empty to add a milestone)`
              : `id ${row.id} is not a milestone of this project (leave id empty to add a milestone)`,
          );
          continue;
        }
      } else {
        const same = byName.get(row.input.name) ?? [];
        if (same.length > 1) {
          add(row.line, `name matches ${same.length} milestones (ids ${same.map((m) => m.id).join(", ")}); give the id`);
          continue;
        }
        target = same[0] ?? null;
      }
      if (target) {
        const other = claimed.get(target.id);
        if (other !== undefined) {
          add(row.line, `updates the same milestone as line ${other}`);
          continue;
        }
        claimed.set(target.id, row.line);
      }
      resolved.push({ row, target, key: target ? target.id : -row.line });
    }

    // Names after the import, for depends_on written as names.
    const keysByName = new Map<string, number[]>();
    const nameOfKey = new Map<number, string>();
    for (const m of existing) if (!claimed.has(m.id)) nameOfKey.set(m.id, m.name);
    for (const r of resolved) nameOfKey.set(r.key, r.row.input.name);
    for (const [key, name] of nameOfKey) keysByName.set(name, [...(keysByName.get(name) ?? []), key]);

    const plans: ImportPlan[] = [];
    for (const { row, target, key } of resolved) {
      const input = row.input;
      const stored = target ? fieldsOf(target) : null;
      // An update keeps the stored value of each column the file leaves out (the required columns are always there).
      const given = storedValuesOf(input);
      const next: MilestoneFields = { phaseId: stored?.phaseId ?? 0, ...given };
      for (const key of Object.keys(given) as Array<keyof StoredValues>) {
        if (stored && !row.columns.has(milestoneColumn(key))) (next as Record<string, unknown>)[key] = stored[key];
      }
      if (!stored) next.forecastFinish = input.forecastFinish ?? input.baselineFinish;
      if (next.actualFinish !== null) next.percentComplete = 100;
      if (next.actualFinish !== null && next.actualFinish > today && next.actualFinish !== stored?.actualFinish) {
        add(row.line, `actual_finish ${next.actualFinish} is after today (${today} in ${project.timeZone})`);
      }
      if (stored && next.baselineFinish !== stored.baselineFinish) {
        add(row.line, `baseline_finish changes only by re-baselining (it is ${stored.baselineFinish}, the file says ${next.baselineFinish})`);
      }
      if (next.plannedStart !== null && next.plannedStart > next.baselineFinish) {
        add(row.line, `planned_start ${next.plannedStart} is after the baseline finish ${next.baselineFinish}`);
      }

      let dependsOn: number[] | null = null;
      if (row.dependsOn !== null) {
        dependsOn = [];
        for (const token of row.dependsOn) {
          if (/^\d+$/.test(token)) {
            const id = Number(token);
            if (!byId.has(id)) add(row.line, `depends_on names no milestone of this project: ${token}`);
            else dependsOn.push(id);
            continue;
          }
          const keys = keysByName.get(token) ?? [];
          if (keys.length === 0) add(row.line, `depends_on names no milestone called "${token}"`);
          else if (keys.length > 1) add(row.line, `depends_on "${token}" names ${keys.length} milestones; use the id`);
          else dependsOn.push(keys[0]!);
        }
        dependsOn = [...new Set(dependsOn)];
      }
      const dependenciesChange = dependsOn !== null && (target === null ? dependsOn.length > 0 : !sameIds(uniqueSorted(dependsOn), target.dependsOn));
      plans.push({ line: row.line, key, target, phase: input.phase, next, dependsOn, dependenciesChange });
    }

    // A loop can only close through a row of the file: the stored programme has none.
    const replaced = new Set(plans.filter((p) => p.dependsOn !== null).map((p) => p.key));
    const edges = (await listDependencyEdges(trx, project.id)).filter((e) => !replaced.has(e.to));
    for (const p of plans) for (const from of p.dependsOn ?? []) edges.push({ from, to: p.key });
    const cycle = findCycle(edges);
    if (cycle) {
      const words = cycleWords(cycle, (k) => nameOfKey.get(k) ?? `#${k}`);
      const lines = plans.filter((p) => cycle.includes(p.key)).map((p) => p.line);
      for (const line of lines) add(line, `depends_on would make a dependency cycle: ${words}`);
    }

    if (problems.size > 0) {
      const rows = [...problems.entries()].sort(([a], [b]) => a - b).map(([line, reasons]) => ({ line, reason: reasons.join("; ") }));
      throw new AppError(
        "csv_invalid",
        `${rows.length === 1 ? "One row has" : `${rows.length} rows have`} problems; nothing was imported. Correct ${rows.length === 1 ? "it" : "them"} and import the file again.`,
        422,
        undefined,
        { rows },
      );
    }
    return plans;
  }

  return {
    async exportCsv(slug: string): Promise<{ filename: string; csv: string }> {
      const project = await projects.get(slug);
      const all = await listMilestones(db, project.id, "staff");
      return { filename: `${project.slug}-milestones.csv`, csv: milestonesToCsv(all) };
    },

    async importCsv(slug: string, csv: string, actor: Actor): Promise<CsvImportResult> {
      const project = await projects.get(slug);
      const parsed = parseMilestoneCsv(csv);
      return db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const existing = await listMilestones(trx, project.id, "staff");
        const plans = await planImport(trx, project, existing, parsed);
        const at = now();
        const ctx = { at, byUserId: actor.user?.id ?? null, note: "Imported from a CSV file" };
        const idOfKey = new Map<number, number>(existing.map((m) => [m.id, m.id]));
        const result: CsvImportResult = { created: 0, updated: 0, unchanged: 0 };
        const touched: Array<{ id: number; name: string; change: "created" | "updated" }> = [];
        for (const p of plans) {
          const phaseId = await findOrCreatePhase(trx, project.id, p.phase);
          const next = { ...p.next, phaseId };
          if (p.target === null) {
            const id = await insertMilestone(trx, project.id, next, at);
            idOfKey.set(p.key, id);
            await insertEvents(trx, eventsFor(null, next, { ...ctx, milestoneId: id, projectId: project.id }));
            result.created += 1;
            touched.push({ id, name: next.name, change: "created" });
            continue;
          }
          const written = await writeUpdate(trx, p.target, next, ctx, project);
          if (!written && p.dependenciesChange) await touch(trx, p.target, at, project);
          if (written || p.dependenciesChange) {
            result.updated += 1;
            touched.push({ id: p.target.id, name: next.name, change: "updated" });
          } else result.unchanged += 1;
        }
        for (const p of plans) {
          if (p.dependsOn === null || (p.target !== null && !p.dependenciesChange)) continue;
          await replaceDependencies(trx, idOfKey.get(p.key)!, uniqueSorted(p.dependsOn.map((k) => idOfKey.get(k)!)));
        }
        if (touched.length > 0) {
          await record(trx, actor, "programme_imported", { type: "project", id: project.id, label: project.slug }, { ...result, rows: parsed.rows.length, milestones: touched });
        }
        return result;
      });
    },
  };
}
