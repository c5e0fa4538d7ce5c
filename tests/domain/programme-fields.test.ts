import { describe, expect, it } from "vitest";
import {
  MILESTONE_CSV_COLUMNS,
  MILESTONE_FIELD_NAMES,
  MILESTONE_FIELDS,
  MilestoneCreateInputSchema,
  MilestonePatchInputSchema,
  PROGRAMME_ANSWERS,
  milestoneColumn,
  milestoneInputOf,
} from "../../src/shared/schemas/programme.ts";

// The milestone field list is written once (MILESTONE_FIELDS); these pin what is derived from it
// to the contract as it stood when each was written out by hand, so a change to the list shows
// up here as a change of the contract, not silently.

describe("the milestone field list", () => {
  it("gives the CSV columns in the published order: id first, the fields, description last", () => {
    expect([...MILESTONE_CSV_COLUMNS]).toEqual([
      "id",
      "name",
      "phase",
      "area",
      "system",
      "weight",
      "percent_complete",
      "planned_start",
      "baseline_finish",
      "forecast_finish",
      "actual_finish",
      "audience",
      "budget",
      "depends_on",
      "description",
    ]);
  });

  it.each([
    ["name", "name"],
    ["percentComplete", "percent_complete"],
    ["plannedStart", "planned_start"],
    ["baselineFinish", "baseline_finish"],
    ["forecastFinish", "forecast_finish"],
    ["actualFinish", "actual_finish"],
    ["dependsOn", "depends_on"],
  ] as const)("names field %s as column %s", (field, column) => {
    expect(milestoneColumn(field)).toBe(column);
  });

  it("gives the create schema every field, with the defaults of an omitted optional field", () => {
    expect(Object.keys(MilestoneCreateInputSchema.shape)).toEqual(MILESTONE_FIELD_NAMES);
    const parsed = MilestoneCreateInputSchema.parse({ name: "Hall 2A ready for service", phase: "Handover", system: "fit-out", weight: 3, baselineFinish: "2027-03-01", audience: "public" });
    expect(parsed).toEqual({
      name: "Hall 2A ready for service",
      phase: "Handover",
      area: "",
      system: "fit-out",
      description: "",
      weight: 3,
      percentComplete: 0,
      plannedStart: null,
      baselineFinish: "2027-03-01",
      forecastFinish: null,
      actualFinish: null,
      audience: "public",
      budget: null,
      dependsOn: [],
    });
  });

  it("gives the patch schema the version, every field but the baseline finish, and a note", () => {
    expect(Object.keys(MilestonePatchInputSchema.shape)).toEqual([
      "version",
      "name",
      "phase",
      "area",
      "system",
      "description",
      "weight",
      "percentComplete",
      "plannedStart",
      "forecastFinish",
      "actualFinish",
      "audience",
      "budget",
      "dependsOn",
      "note",
    ]);
    const refused = MilestonePatchInputSchema.safeParse({ version: 2, baselineFinish: "2027-03-01" });
    expect(refused.success).toBe(false);
    expect(MilestonePatchInputSchema.parse({ version: 2, forecastFinish: "2027-03-08" })).toEqual({ version: 2, forecastFinish: "2027-03-08" });
  });

  it("gives the same field messages on create and on patch", () => {
    const create = MilestoneCreateInputSchema.safeParse({ name: "UPS L4", phase: "Commissioning", system: "power", weight: 0, percentComplete: 120, baselineFinish: "2027-01-15", audience: "public" });
    const patch = MilestonePatchInputSchema.safeParse({ version: 1, weight: 0, percentComplete: 120 });
    const messages = (r: typeof create | typeof patch) => Object.fromEntries((r.error?.issues ?? []).map((i) => [String(i.path[0]), i.message]));
    expect(messages(create)).toEqual({ weight: "must be greater than 0", percentComplete: "must be between 0 and 100" });
    expect(messages(patch)).toEqual(messages(create));
  });

  it("gives every field a kind for how it is written outside JSON", () => {
    expect(Object.fromEntries(MILESTONE_FIELD_NAMES.map((f) => [f, MILESTONE_FIELDS[f].kind]))).toEqual({
      name: "line",
      phase: "line",
      area: "line",
      system: "code",
      description: "text",
      weight: "number",
      percentComplete: "number",
      plannedStart: "optional-date",
      baselineFinish: "code",
      forecastFinish: "optional-date",
      actualFinish: "optional-date",
      audience: "code",
      budget: "optional-number",
      dependsOn: "ids",
    });
  });

  it("gives the answer's milestone every written field, besides what is computed and kept with it", () => {
    expect(Object.keys(PROGRAMME_ANSWERS.milestone.shape)).toEqual([
      "id",
      ...MILESTONE_FIELD_NAMES,
      "phaseId",
      "status",
      "slipDays",
      "slipWorkingDays",
      "version",
      "updatedAt",
      "removal",
    ]);
  });

  it("takes the health computation's input from a milestone, field for field", () => {
    const m = {
      id: 7,
      name: "Generator set 3 delivered",
      phase: "Plant",
      weight: 2,
      percentComplete: 40,
      plannedStart: "2026-06-01",
      baselineFinish: "2026-08-03",
      forecastFinish: "2026-08-17",
      actualFinish: null,
      budget: 125_000_00,
      dependsOn: [3, 4],
      audience: "investor",
    };
    expect(milestoneInputOf(m)).toEqual({
      id: 7,
      name: "Generator set 3 delivered",
      weight: 2,
      percentComplete: 40,
      plannedStart: "2026-06-01",
      baselineFinish: "2026-08-03",
      forecastFinish: "2026-08-17",
      actualFinish: null,
      budget: 125_000_00,
      dependsOn: [3, 4],
    });
  });
});
