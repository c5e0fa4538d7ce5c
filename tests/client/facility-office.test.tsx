import { act, fireEvent, screen, within } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { FacilityAnswer, SystemAnswer, UnitAnswer, UnitStage } from "../../src/shared/schemas/facility.ts";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { StageKey, UnitRow } from "../../src/features/facility/components/unit-shapes.tsx";
import { stageNoteError, UnitStageForm } from "../../src/features/facility/components/unit-stage-form.tsx";
import { previewStage } from "../../src/features/facility/preview.ts";
import { goesBackwards, nextStage } from "../../src/features/facility/words.ts";
import { makeMilestone } from "./milestone-fixture.ts";
import { renderWithApp } from "./render.tsx";

afterEach(() => vi.unstubAllGlobals());

// Our own example. Hall 2A depends on one milestone, complete. Its supply fans need six
// units (N = 6) in one system, eight planned; a unit carries load from L4. Five fans are at
// L4 and one at L3, so the air movement is "short by 1" and the hall is not ready for
// service. Commissioning the L3 fan to L4 makes six available: "N", and the hall is ready.
const AT = "2027-03-01";
const CALENDAR = { weekendDays: [6, 7], holidays: [] };
const MILESTONES: Milestone[] = [makeMilestone({ id: 11, name: "Hall 2A fit-out complete", baselineFinish: "2027-02-01", actualFinish: "2027-02-01", percentComplete: 100, status: "complete" })];

function unit(id: number, label: string, stage: UnitStage, available: boolean): UnitAnswer {
  const commissioned = stage.startsWith("L");
  return { id, label, tag: "", train: 1, stage, status: commissioned ? "commissioned" : (stage as UnitAnswer["status"]), commissioningLevel: commissioned ? Number(stage.slice(1)) : null, available, version: 1 };
}

const FANS: UnitAnswer[] = [
  ...[1, 2, 3, 4, 5].map((n) => unit(n, `Fan ${n}`, "L4", true)),
  unit(6, "Fan 6", "L3", false),
  unit(7, "Fan 7", "installed", false),
  unit(8, "Fan 8", "ordered", false),
];

const SYSTEM: SystemAnswer = {
  id: 21,
  name: "Supply fans",
  kind: "air_movement",
  audience: "public",
  serves: [31],
  neededPerSystem: 6,
  independentSystems: 1,
  ratingPerUnit: null,
  ratingUnit: null,
  design: { airflowM3s: 5, deltaTK: 12, chilledWaterFlowKgS: null, chilledWaterSupplyC: null, chilledWaterReturnC: null, supplyAirC: null, usableFuelLitres: null, specificFuelConsumption: 0.27 },
  linkedMilestones: [],
  notes: "",
  units: FANS,
  redundancy: { design: "N+2", now: "short by 1", shortfall: 3, available: 5, planned: 8, summary: "design N+2 · now short by 1 (5 of 8 commissioned to L4)", carriesLoad: false },
  version: 1,
};

const FACILITY: FacilityAnswer = {
  at: AT,
  availableFromLevel: 4,
  blocks: [
    {
      id: 31,
      name: "Hall 2A",
      racks: 48,
      itKw: 480,
      maxKwPerRack: 10,
      coolingApproach: "",
      containment: "hot_aisle",
      audience: "public",
      stage: "Stage 1",
      notes: "",
      dependsOn: [11],
      baselineReadyDate: "2027-02-01",
      forecastReadyDate: "2027-02-01",
      readyForService: false,
      slipWorkingDays: 0,
      missing: ["Supply fans: now short by 1"],
      systemIds: [21],
      version: 1,
    },
  ],
  systems: [SYSTEM],
  ramp: [],
  features: [],
  caution: "Indicative.",
};

describe("the units of a system as shapes", () => {
  it("draws each unit with its label and stage as text, and names it in full for screen readers", () => {
    renderWithApp(<UnitRow units={FANS} label="Units of Supply fans" />);
    const row = screen.getByRole("list", { name: "Units of Supply fans" });
    expect(within(row).getAllByRole("listitem")).toHaveLength(8);
    const fan5 = screen.getByRole("img", { name: "Fan 5: commissioned to L4, functional test passed; carries load" });
    expect(fan5.textContent).toBe("Fan 5L4");
    expect(screen.getByRole("img", { name: "Fan 6: commissioned to L3, installed and started" }).textContent).toBe("Fan 6L3");
    expect(screen.getByRole("img", { name: "Fan 8: ordered" }).textContent).toBe("Fan 8Ordered");
  });

  it("fills the shape as the unit progresses: dashed when ordered, a fifth per level, a heavy frame once it carries load", () => {
    renderWithApp(<UnitRow units={FANS} label="Units" />);
    const shape = (id: number) => document.querySelector(`[data-unit-id="${id}"] svg`) as SVGElement;
    const frame = (id: number) => shape(id).querySelector("rect[fill='none']") as SVGRectElement;
    const filled = (id: number) => Number(shape(id).querySelector("rect[fill='currentColor']")?.getAttribute("height") ?? 0);
    expect(frame(8).getAttribute("stroke-dasharray")).toBe("3 2");
    expect(frame(7).getAttribute("stroke-dasharray")).toBeNull();
    expect(filled(7)).toBe(0);
    // 16 units of height inside the frame: L3 fills three fifths, L4 four fifths.
    expect(filled(6)).toBeCloseTo(9.6, 10);
    expect(filled(5)).toBeCloseTo(12.8, 10);
    expect(frame(5).getAttribute("stroke-width")).toBe("3");
    expect(frame(6).getAttribute("stroke-width")).toBe("1.5");
  });

  it("keys every stage by word beside its shape", () => {
    renderWithApp(<StageKey availableFromLevel={4} />);
    const key = screen.getByRole("list", { name: "Unit stage key" });
    expect(key.textContent).toContain("L4 functional test passed");
    expect(key.textContent).toContain("heavy frame: carries load (from L4)");
    expect(key.querySelectorAll("svg[data-shape]")).toHaveLength(9);
  });
});

describe("previewStage (the walk's before-you-save computation)", () => {
  it("commissioning Fan 6 to L4 turns the fans from short by 1 to N and makes Hall 2A ready for service", () => {
    const p = previewStage(FACILITY, MILESTONES, CALENDAR, 6, "L4");
    expect(p?.before.now).toBe("short by 1");
    expect(p?.after.now).toBe("N");
    expect(p?.after.design).toBe("N+2");
    expect(p?.unit).toEqual({ before: false, after: true });
    expect(p?.blocks).toEqual([
      { id: 31, name: "Hall 2A", before: { ready: false, missing: [expect.stringContaining("Supply fans: now short by 1")] }, after: { ready: true, missing: [] } },
    ]);
  });

  it("taking Fan 1 back to installed leaves the fans two short", () => {
    expect(previewStage(FACILITY, MILESTONES, CALENDAR, 1, "installed")?.after.now).toBe("short by 2");
  });
});

describe("setting a unit's stage", () => {
  const renderForm = (u: UnitAnswer) =>
    renderWithApp(<UnitStageForm slug="aldermere-phase-2" unit={u} system={SYSTEM} facility={FACILITY} milestones={MILESTONES} calendar={CALENDAR} position="6 of 8" thenNext onSaved={() => undefined} />);

  it("marks the next stage, and shows the new label and readiness after one tap, before saving", () => {
    renderForm(FANS[5]!);
    expect(screen.queryByTestId("stage-preview")).toBeNull();
    const next = screen.getByRole("button", { name: "L4, functional test passed (next)" });
    fireEvent.click(next);
    expect(next.getAttribute("aria-pressed")).toBe("true");
    const preview = screen.getByTestId("stage-preview");
    expect(within(preview).getByTestId("preview-label").textContent).toContain("now short by 1→becomesN · design N+2");
    expect(within(preview).getByTestId("preview-block").textContent).toBe("Hall 2A○Not ready→becomes●Ready for service");
    expect(screen.getByRole("button", { name: "Save L4 and next" })).toBeTruthy();
  });

  it("says a backwards move needs a note as soon as it is picked, and sends nothing without one", async () => {
    const fetch = vi.fn();
    vi.stubGlobal("fetch", fetch);
    renderForm(FANS[0]!);
    fireEvent.click(screen.getByRole("button", { name: "Installed" }));
    expect(screen.getByText("Going from L4 back to Installed needs a note saying why.")).toBeTruthy();
    expect(screen.getByLabelText("Note from the walk (required)")).toBeTruthy();
    await act(async () => {
      fireEvent.click(screen.getByRole("button", { name: "Save Installed and next" }));
    });
    expect(screen.getByRole("alert").textContent).toContain("is required when a unit goes back (L4 → Installed)");
    expect(fetch).not.toHaveBeenCalled();
  });
});

describe("the stage rules", () => {
  it("a note is needed only when the stage goes back", () => {
    expect(goesBackwards("L4", "L2")).toBe(true);
    expect(goesBackwards("L2", "L4")).toBe(false);
    expect(stageNoteError("L4", "L2", "  ")).toMatch(/^is required when a unit goes back/);
    expect(stageNoteError("L4", "L2", "bearing noise on test")).toBeNull();
    expect(stageNoteError("L3", "L4", undefined)).toBeNull();
    expect(nextStage("installed")).toBe("L1");
    expect(nextStage("L5")).toBeNull();
  });
});
