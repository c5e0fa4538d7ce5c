/**
 * The live preview of an edit: the programme's health computed in the browser by the
 * same pure function the server uses, over the loaded milestones before and after the
 * pending change, so the lead sees what a change does before saving it.
 */
import { milestoneInputOf, type Milestone, type MilestonePatchInput } from "#shared/schemas/programme.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { addWorkingDays } from "#shared/domain/calendar.ts";
import { computeProgrammeHealth, type MilestoneInput, type MilestoneStatus, type ProgrammeHealth, type ProgrammeSettings } from "#shared/domain/programme-health.ts";

/** The fields the table edits in place, which a pending change may hold (the rest are edited in the milestone's own form). */
const DRAFT_FIELDS = ["percentComplete", "forecastFinish", "actualFinish", "audience", "weight", "plannedStart"] as const satisfies ReadonlyArray<keyof MilestonePatchInput>;

/** The editable fields of a milestone that a pending change may hold. */
export type MilestoneDraft = Partial<Pick<MilestonePatchInput, (typeof DRAFT_FIELDS)[number]>>;

/** Pending changes by milestone id; baseline finishes only by re-baselining. */
export type Drafts = Record<number, MilestoneDraft & { baselineFinish?: string }>;

export function settingsOf(project: Pick<Project, "settings">): ProgrammeSettings {
  const s = project.settings;
  return {
    toleranceWorkingDays: s.toleranceWorkingDays,
    behindWorkingDays: s.behindWorkingDays,
    calendar: { weekendDays: s.weekendDays, holidays: s.holidays },
  };
}

/** A loaded milestone as the health computation's input: the same fields the server computes from. */
export const toMilestoneInput = (m: Milestone): MilestoneInput => milestoneInputOf(m);

/** The milestones with the drafts laid over them (fields left out of a draft stay as they are). */
export function applyDrafts(milestones: readonly Milestone[], drafts: Drafts): MilestoneInput[] {
  return milestones.map((m) => {
    const base = toMilestoneInput(m);
    const d = drafts[m.id];
    if (!d) return base;
    // Every drafted field the computation reads (the audience changes no figure).
    const laid: MilestoneInput = { ...base };
    for (const [key, value] of Object.entries(d)) if (value !== undefined && key in base) (laid as unknown as Record<string, unknown>)[key] = value;
    return laid;
  });
}

export interface PreviewResult {
  before: ProgrammeHealth;
  after: ProgrammeHealth;
  /** Each drafted milestone's status before and after. */
  statuses: Array<{ id: number; name: string; before: MilestoneStatus; after: MilestoneStatus; slipBefore: number; slipAfter: number }>;
  /** Null when the change is not valid enough to compute (e.g. a half-typed date). */
  error: string | null;
}

/**
 * Health before and after the drafts, at `at` (the status date: the project's today).
 * A date that does not parse yields the `before` figures for both and an error.
 */
export function previewDrafts(milestones: readonly Milestone[], drafts: Drafts, settings: ProgrammeSettings, at: string): PreviewResult {
  const before = computeProgrammeHealth({ milestones: milestones.map(toMilestoneInput), at, settings });
  let after = before;
  let error: string | null = null;
  try {
    after = computeProgrammeHealth({ milestones: applyDrafts(milestones, drafts), at, settings });
  } catch (e) {
    error = e instanceof Error ? e.message : "The change cannot be computed.";
  }
  const beforeById = new Map(before.milestones.map((h) => [h.id, h]));
  const afterById = new Map(after.milestones.map((h) => [h.id, h]));
  const statuses = Object.keys(drafts)
    .map(Number)
    .flatMap((id) => {
      const m = milestones.find((x) => x.id === id);
      const b = beforeById.get(id);
      const a = afterById.get(id);
      return m && b && a ? [{ id, name: m.name, before: b.status, after: a.status, slipBefore: b.slipDays, slipAfter: a.slipDays }] : [];
    });
  return { before, after, statuses, error };
}

/** Drafts that move each open milestone's forecast by `workingDays` of the project's calendar, as the shift endpoint does. */
export function shiftDrafts(milestones: readonly Milestone[], ids: readonly number[], workingDays: number, settings: ProgrammeSettings): Drafts {
  const drafts: Drafts = {};
  if (!Number.isInteger(workingDays) || workingDays === 0) return drafts;
  for (const m of milestones) {
    if (!ids.includes(m.id) || m.actualFinish !== null) continue;
    drafts[m.id] = { forecastFinish: addWorkingDays(m.forecastFinish ?? m.baselineFinish, workingDays, settings.calendar) };
  }
  return drafts;
}

/** Drafts for a re-baseline that adopts the forecasts: each milestone's baseline becomes its forecast where it has one. */
export function rebaselineDrafts(milestones: readonly Milestone[]): Drafts {
  const drafts: Drafts = {};
  for (const m of milestones) if (m.forecastFinish !== null && m.forecastFinish !== m.baselineFinish) drafts[m.id] = { baselineFinish: m.forecastFinish };
  return drafts;
}

/** The fields of a draft that differ from the milestone, as a PATCH body with the version read. */
export function patchOf(m: Milestone, draft: MilestoneDraft, note?: string): MilestonePatchInput {
  const patch: MilestonePatchInput = { version: m.version };
  for (const key of DRAFT_FIELDS) {
    if (draft[key] !== undefined && draft[key] !== m[key]) (patch as Record<string, unknown>)[key] = draft[key];
  }
  if (note && note.trim() !== "") patch.note = note.trim();
  return patch;
}

/** Whether a PATCH body changes anything besides its version and note. */
export function patchChangesSomething(patch: MilestonePatchInput): boolean {
  return Object.keys(patch).some((k) => k !== "version" && k !== "note");
}
