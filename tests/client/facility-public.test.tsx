import { fireEvent, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { FacilityAnswer, SystemAnswer, UnitAnswer } from "../../src/shared/schemas/facility.ts";
import { INDICATIVE_CAUTION } from "../../src/shared/domain/facility.ts";
import { BlockCard } from "../../src/features/public-site/components/facility-block-card.tsx";
import { KeyFacts } from "../../src/features/public-site/components/facility-key-facts.tsx";
import { SystemUnits } from "../../src/features/public-site/components/facility-units.tsx";
import { rampPoints } from "../../src/features/public-site/components/facility-ramp-chart.tsx";
import { firstOfMonthTicks } from "../../src/features/public-site/components/month-ticks.ts";
import { publicPart } from "../../src/features/public-site/facility-routes.tsx";
import { toDayNumber } from "../../src/shared/domain/calendar.ts";
import { laterInWords, readyInWords } from "../../src/features/public-site/facility-words.ts";
import { aboutLine, EnquiryForm } from "../../src/features/enquiries/components/enquiry-form.tsx";
import { block } from "./facility-fixtures.ts";
import { renderWithApp } from "./render.tsx";

// Invented figures in the shape of the demo (Aldermere Phase 2); the answers the route sends.

function unit(id: number, stage: UnitAnswer["stage"], available: boolean, train = 1): UnitAnswer {
  const level = /^L(\d)$/.exec(stage);
  return {
    id,
    label: `Chiller ${id}`,
    tag: "",
    train,
    status: level ? "commissioned" : (stage as "ordered" | "delivered" | "installed"),
    commissioningLevel: level ? Number(level[1]) : null,
    stage,
    available,
    version: 1,
  };
}

function system(over: Partial<SystemAnswer> = {}): SystemAnswer {
  return {
    id: 5,
    name: "Chillers",
    kind: "cooling",
    audience: "public",
    serves: [1],
    neededPerSystem: 4,
    independentSystems: 1,
    ratingPerUnit: 400,
    ratingUnit: "kW",
    design: { airflowM3s: null, deltaTK: null, chilledWaterFlowKgS: null, chilledWaterSupplyC: null, chilledWaterReturnC: null, supplyAirC: 24, usableFuelLitres: null, specificFuelConsumption: 0.27 },
    linkedMilestones: [],
    notes: "",
    units: [unit(1, "L5", true), unit(2, "L4", true), unit(3, "L4", true), unit(4, "L4", true), unit(5, "delivered", false)],
    redundancy: { design: "N+1", now: "N", shortfall: 1, available: 4, planned: 5, summary: "design N+1 · now N (4 of 5 commissioned)", carriesLoad: true },
    heat: { removalKw: 1600, loadKw: 1460, marginKw: 140, method: "rating", inletBand: "within the recommended range (18–27 °C)" },
    version: 1,
    ...over,
  };
}

describe("the block card", () => {
  it("gives racks, IT kW and density, and the ready-for-service date in words against the planned date", () => {
    renderWithApp(<BlockCard block={block()} systems={[system()]} slug="aldermere-phase-2" updatesHref="/projects/aldermere-phase-2/updates?block=7" />);
    const card = screen.getByTestId("block-card");
    const figures = within(card).getAllByRole("definition").map((d) => d.textContent);
    // The three figures first, then the plant serving the block with its labels.
    expect(figures).toEqual(["48", "480kW", "10kW/rack", "design N+1 · now N"]);
    expect(within(card).getAllByRole("term").map((d) => d.textContent)).toEqual(["Racks", "IT load", "Up to", "Chillers"]);
    // 2 April → 14 May 2027 is 42 calendar days: six weeks exactly.
    expect(screen.getByTestId("block-ready").textContent).toBe("Ready for service: forecast 14 May 2027 (planned 2 April 2027, 6 weeks later)");
    expect(within(card).getByText("Not yet ready for service")).toBeTruthy();
    expect(within(screen.getByTestId("block-missing")).getAllByRole("listitem").map((li) => li.textContent)).toEqual(block().missing);
    expect(card.textContent).toContain("Air-cooled chillers with free cooling, hot-aisle containment");
  });

  it("shows the first three things still to do and folds the rest away behind their count", () => {
    const missing = ["One", "Two", "Three", "Four", "Five"].map((w) => `${w} not yet complete`);
    renderWithApp(<BlockCard block={block({ missing })} systems={[]} slug="s" updatesHref="/u" />);
    const list = screen.getByTestId("block-missing");
    expect(within(list).getAllByRole("listitem").map((li) => li.textContent)).toEqual(missing);
    const more = list.querySelector("details");
    expect(more?.querySelector("summary")?.textContent).toBe("2 more things to do");
    expect(Array.from(more?.querySelectorAll("li") ?? []).map((li) => li.textContent)).toEqual(["Four not yet complete", "Five not yet complete"]);
  });

  it("links to the enquiry pre-filled from the block, and to the updates about it", () => {
    renderWithApp(<BlockCard block={block({ id: 7 })} systems={[]} slug="aldermere-phase-2" updatesHref="/projects/aldermere-phase-2/updates?block=7" />);
    expect(screen.getByRole("link", { name: /Ask about this block/ }).getAttribute("href")).toBe("/projects/aldermere-phase-2/enquire?block=7");
    expect(screen.getByRole("link", { name: "Updates about Hall 2A →" }).getAttribute("href")).toBe("/projects/aldermere-phase-2/updates?block=7");
  });

  it("says a ready block is ready, from when, and lists nothing missing", () => {
    renderWithApp(<BlockCard block={block({ readyForService: true, forecastReadyDate: "2027-03-30", missing: [] })} systems={[]} slug="s" updatesHref="/u" />);
    expect(screen.getByTestId("block-ready").textContent).toBe("Ready for service since 30 March 2027");
    expect(screen.queryByTestId("block-missing")).toBeNull();
    expect(screen.getByText("Ready for service").closest("[data-ready]")?.getAttribute("data-ready")).toBe("true");
  });
});

describe("ready-for-service words", () => {
  it.each([
    [0, "on the planned date"],
    [3, "3 days later"],
    [42, "6 weeks later"],
    [45, "about 6 weeks later"],
    [-14, "2 weeks earlier"],
    [91, "about 3 months later"],
  ])("a slip of %i calendar days reads “%s”", (days, words) => {
    expect(laterInWords(days)).toBe(words);
  });

  it("says “as planned” when forecast and baseline agree, and “no date yet” without a forecast", () => {
    expect(readyInWords({ readyForService: false, forecastReadyDate: "2027-04-02", baselineReadyDate: "2027-04-02" })).toBe("Ready for service: forecast 2 April 2027 (as planned)");
    expect(readyInWords({ readyForService: false, forecastReadyDate: null, baselineReadyDate: null })).toBe("Ready for service: no date yet");
  });
});

describe("the units drawing", () => {
  it("draws one shape per unit, filled for those that carry load, with the labels in words", () => {
    const { container } = renderWithApp(<SystemUnits system={system()} />);
    const shapes = screen.getAllByTestId("unit-shape");
    expect(shapes.map((s) => s.getAttribute("data-look"))).toEqual(["available", "available", "available", "available", "delivered"]);
    // Filled square for a unit that carries load; an outline only for one delivered.
    expect(shapes[0]!.querySelector("rect")?.getAttribute("fill")).toBe("currentColor");
    expect(shapes[4]!.querySelector("rect")?.getAttribute("fill")).toBe("none");
    expect(screen.getByTestId("redundancy-words").textContent).toBe("design N+1 · now N (4 of 5 units carry load; 1 more needed for the design)");
    expect(shapes[4]!.textContent).toBe("Chiller 5: delivered");
    expect(shapes[0]!.textContent).toBe("Chiller 1: commissioned to L5, carries load");
    // The key names only the stages drawn, each in words beside its shape.
    const key = screen.getByRole("list", { name: "Key to the unit shapes" });
    expect(within(key).getAllByRole("listitem").map((li) => li.textContent)).toEqual(["Commissioned, carries load", "Delivered"]);
    expect(container.textContent).toContain("4 units carry the design load.");
  });

  it("tells a unit being commissioned below the level that carries load from one installed and one ordered, by shape", () => {
    renderWithApp(<SystemUnits system={system({ units: [unit(1, "L2", false), unit(2, "installed", false), unit(3, "ordered", false)] })} />);
    const shapes = screen.getAllByTestId("unit-shape");
    expect(shapes.map((s) => s.getAttribute("data-look"))).toEqual(["commissioning", "installed", "ordered"]);
    expect(shapes[0]!.querySelector("path")).not.toBeNull();
    expect(shapes[1]!.querySelector("circle")).not.toBeNull();
    expect(shapes[2]!.querySelector("rect")?.getAttribute("stroke-dasharray")).toBeTruthy();
  });

  it("draws each independent system of a 2N design on its own row", () => {
    renderWithApp(
      <SystemUnits
        system={system({ independentSystems: 2, neededPerSystem: 2, units: [unit(1, "L4", true, 1), unit(2, "L4", true, 1), unit(3, "L4", true, 2), unit(4, "installed", false, 2)], redundancy: { design: "2N", now: "N (short of 2N by 1)", shortfall: 1, available: 3, planned: 4, summary: "", carriesLoad: true } })}
      />,
    );
    expect(screen.getByText("System A")).toBeTruthy();
    expect(screen.getByText("System B")).toBeTruthy();
    expect(screen.getByText(/in each of 2 independent systems/)).toBeTruthy();
  });
});

describe("the key facts", () => {
  const facts: Pick<FacilityAnswer, "systems" | "features" | "caution"> = {
    systems: [
      system(),
      system({
        id: 9,
        name: "Bulk fuel tank",
        kind: "fuel_storage",
        heat: undefined,
        fuel: { usableLitres: 20_000, specificFuelConsumption: 0.27, designLoadKw: 1000, fullLoadKw: 2000, autonomyHoursAtDesignLoad: 74.07, autonomyHoursAtFullLoad: 37.04 },
      }),
    ],
    features: [
      { id: 1, kind: "security", name: "Turnstiles", detail: "", layer: "building", status: "in_place", statusDate: null, audience: "public", version: 1 },
      { id: 2, kind: "security", name: "Fence and gatehouse", detail: "", layer: "perimeter", status: "in_progress", statusDate: null, audience: "public", version: 1 },
      { id: 3, kind: "certification", name: "Information security management", detail: "", layer: null, status: "in_audit", statusDate: "2027-06-30", audience: "public", version: 1 },
    ],
    caution: INDICATIVE_CAUTION,
  };

  it("gives fuel autonomy at design and full load and the heat margin, each marked indicative beside the caution", () => {
    renderWithApp(<KeyFacts facility={facts} slug="s" visitsOffered={false} />);
    // Common practice (no published source): 20,000 L at 0.27 L/kWh and 1,000 kW → 74.1 h.
    expect(screen.getByTestId("fuel-fact").textContent).toContain("About 74.1 hours at the design load of the blocks served (1,000 kW); 37 hours with the generators at full load (2,000 kW).");
    expect(screen.getByTestId("heat-fact").textContent).toContain("About 1,600 kW against 1,460 kW of IT load: a margin of 140 kW.");
    const caution = screen.getByTestId("indicative-caution");
    expect(caution.textContent).toContain(INDICATIVE_CAUTION);
    const marks = screen.getAllByText("(indicative)");
    expect(marks).toHaveLength(2);
    for (const m of marks) expect(m.getAttribute("aria-describedby")).toBe(caution.id);
    expect(screen.queryByTestId("visit-safety")).toBeNull();
  });

  it("lists security from the perimeter inwards and each status by word and shape, and the site rules where visits are offered", () => {
    renderWithApp(<KeyFacts facility={facts} slug="s" visitsOffered />);
    const security = within(screen.getByTestId("features-security")).getAllByRole("listitem");
    expect(security.map((li) => li.querySelector("p")?.textContent)).toEqual(["Perimeter: Fence and gatehouse", "Building: Turnstiles"]);
    expect(security[0]!.querySelector('[data-status="in_progress"] svg')?.getAttribute("data-shape")).toBe("half");
    expect(security[1]!.querySelector('[data-status="in_place"] svg')?.getAttribute("data-shape")).toBe("disc");
    expect(screen.getByTestId("features-certification").textContent).toContain("In auditexpected 30 June 2027");
    expect(screen.getByTestId("visit-safety").textContent).toMatch(/escorted at all times; every visitor takes the site induction/);
  });
});

describe("what the public page shows of the caller's answer", () => {
  it("keeps only public blocks, systems and features, and a block lists only the public plant serving it", () => {
    const answer: FacilityAnswer = {
      at: "2027-01-10",
      availableFromLevel: 4,
      blocks: [block({ systemIds: [5, 6] }), block({ id: 2, name: "Investor block", audience: "investor" })],
      systems: [system(), system({ id: 6, name: "Internal plant", audience: "internal" })],
      ramp: [],
      features: [{ id: 1, kind: "client", name: "Board room", detail: "", layer: null, status: "planned", statusDate: null, audience: "investor", version: 1 }],
      caution: INDICATIVE_CAUTION,
    };
    const shown = publicPart(answer);
    expect(shown.blocks.map((b) => b.name)).toEqual(["Hall 2A"]);
    expect(shown.blocks[0]!.systemIds).toEqual([5]);
    expect(shown.systems.map((s) => s.name)).toEqual(["Chillers"]);
    expect(shown.features).toEqual([]);
  });
});

describe("the enquiry from a block's card", () => {
  const project = { id: 1, slug: "aldermere-phase-2", name: "Aldermere Campus, Phase 2", visitsOffered: true } as never;

  it("comes pre-filled with the block's racks and density, and names the block", () => {
    renderWithApp(<EnquiryForm project={project} about={{ name: "HD-1", racks: 20, kwPerRack: 25 }} />);
    expect((screen.getByLabelText("Racks") as HTMLInputElement).value).toBe("20");
    expect((screen.getByLabelText("kW per rack") as HTMLInputElement).value).toBe("25");
    expect(screen.getByTestId("enquiry-about").textContent).toContain("Asking about HD-1: 20 racks, up to 25 kW per rack.");
    expect(aboutLine({ name: "HD-1", racks: 20, kwPerRack: 25 })).toBe("About HD-1 (20 racks, up to 25 kW per rack).");
    fireEvent.click(screen.getByRole("button", { name: "Not about this block" }));
    expect(screen.queryByTestId("enquiry-about")).toBeNull();
  });

  it("leaves the figures empty where they fall outside what an enquiry takes", () => {
    renderWithApp(<EnquiryForm project={project} about={{ name: "Big hall", racks: 6000, kwPerRack: 250 }} />);
    expect((screen.getByLabelText("Racks") as HTMLInputElement).value).toBe("");
    expect((screen.getByLabelText("kW per rack") as HTMLInputElement).value).toBe("");
  });
});

describe("the capacity ramp's drawing", () => {
  const ramp = [
    { date: "2027-04-02", racksBaseline: 48, racksForecast: 0, kwBaseline: 480, kwForecast: 0 },
    { date: "2027-04-16", racksBaseline: 68, racksForecast: 48, kwBaseline: 980, kwForecast: 480 },
    { date: "2027-07-30", racksBaseline: 116, racksForecast: 116, kwBaseline: 1460, kwForecast: 1460 },
  ];

  it("starts at nothing a month before the first step and holds the last level two months on, for racks and for kW", () => {
    const racks = rampPoints(ramp, "racks");
    expect(racks[0]).toEqual({ day: toDayNumber("2027-03-03"), baseline: 0, forecast: 0 });
    expect(racks.slice(1, 4).map((p) => [p.baseline, p.forecast])).toEqual([
      [48, 0],
      [68, 48],
      [116, 116],
    ]);
    expect(racks[4]).toEqual({ day: toDayNumber("2027-09-28"), baseline: 116, forecast: 116 });
    expect(rampPoints(ramp, "kw")[2]).toMatchObject({ baseline: 980, forecast: 480 });
    expect(rampPoints([], "kw")).toEqual([]);
  });

  it("puts ticks on the first of each month, thinned so a phone's axis is not crowded", () => {
    expect(firstOfMonthTicks(toDayNumber("2027-03-03"), toDayNumber("2027-09-28"))).toEqual(["2027-04-01", "2027-05-01", "2027-06-01", "2027-07-01", "2027-08-01", "2027-09-01"].map(toDayNumber));
    expect(firstOfMonthTicks(toDayNumber("2027-01-15"), toDayNumber("2028-01-15"))).toEqual(["2027-02-01", "2027-04-01", "2027-06-01", "2027-08-01", "2027-10-01", "2027-12-01"].map(toDayNumber));
  });
});
