import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  dependencyEdges,
  drivingChain,
  findCycle,
  projectDrivers,
  type DependencyEdge,
  type DependencyMilestone,
} from "../../src/shared/domain/programme-dependencies.ts";

/** True when `cycle` is a closed walk along `edges` (each id a predecessor of the next, the last of the first). */
function isCycleOf(cycle: number[], edges: readonly DependencyEdge[]): boolean {
  if (cycle.length === 0 || new Set(cycle).size !== cycle.length) return false;
  return cycle.every((id, i) => {
    const next = cycle[(i + 1) % cycle.length];
    return edges.some((e) => e.from === id && e.to === next);
  });
}

/** Reference acyclicity test (Kahn's algorithm, a textbook topological sort). */
function isAcyclic(edges: readonly DependencyEdge[]): boolean {
  const nodes = new Set(edges.flatMap((e) => [e.from, e.to]));
  const indegree = new Map([...nodes].map((n) => [n, 0]));
  for (const e of edges) indegree.set(e.to, (indegree.get(e.to) ?? 0) + 1);
  const queue = [...nodes].filter((n) => indegree.get(n) === 0);
  let seen = 0;
  while (queue.length > 0) {
    const n = queue.shift() as number;
    seen += 1;
    for (const e of edges) {
      if (e.from !== n) continue;
      const d = (indegree.get(e.to) as number) - 1;
      indegree.set(e.to, d);
      if (d === 0) queue.push(e.to);
    }
  }
  return seen === nodes.size;
}

describe("findCycle", () => {
  // Our own examples.
  it.each([
    ["no edges", [], null],
    ["a chain", [{ from: 1, to: 2 }, { from: 2, to: 3 }], null],
    ["a diamond (two paths, no loop)", [{ from: 1, to: 2 }, { from: 1, to: 3 }, { from: 2, to: 4 }, { from: 3, to: 4 }], null],
    ["a milestone depending on itself", [{ from: 7, to: 7 }], [7]],
    ["two milestones depending on each other", [{ from: 5, to: 3 }, { from: 3, to: 5 }], [3, 5]],
    ["a loop of three, reported from the smallest id", [{ from: 9, to: 4 }, { from: 4, to: 6 }, { from: 6, to: 9 }], [4, 6, 9]],
    ["a loop behind a chain", [{ from: 1, to: 2 }, { from: 2, to: 3 }, { from: 3, to: 4 }, { from: 4, to: 2 }], [2, 3, 4]],
  ])("%s → %j", (_label, edges, expected) => {
    expect(findCycle(edges)).toEqual(expected);
  });

  it("handles a chain of 100,000 milestones without overflowing the stack", () => {
    const edges = Array.from({ length: 100_000 }, (_, i) => ({ from: i, to: i + 1 }));
    expect(findCycle(edges)).toBeNull();
    expect(findCycle([...edges, { from: 100_000, to: 0 }])?.length).toBe(100_001);
  });

  it("finds a cycle exactly when a topological sort fails, and the cycle is real (property)", () => {
    // Source: Kahn's algorithm (topological sorting) as the reference test of acyclicity.
    const edgesArb = fc.array(fc.record({ from: fc.integer({ min: 1, max: 12 }), to: fc.integer({ min: 1, max: 12 }) }), { maxLength: 30 });
    fc.assert(
      fc.property(edgesArb, (edges) => {
        const cycle = findCycle(edges);
        expect(cycle === null).toBe(isAcyclic(edges));
        if (cycle !== null) {
          expect(isCycleOf(cycle, edges)).toBe(true);
          expect(cycle[0]).toBe(Math.min(...cycle));
        }
      }),
    );
  });

  it("reads edges from milestones' dependsOn", () => {
    expect(dependencyEdges([{ id: 2, dependsOn: [1] }, { id: 3, dependsOn: [1, 2] }, { id: 1 }])).toEqual([
      { from: 1, to: 2 },
      { from: 1, to: 3 },
      { from: 2, to: 3 },
    ]);
  });
});

// Our own example: an invented slice of the Aldermere Phase 2 programme.
function m(id: number, name: string, finish: string, dependsOn: number[] = [], actual: string | null = null): DependencyMilestone {
  return { id, name, baselineFinish: "2026-06-01", forecastFinish: finish, actualFinish: actual, dependsOn };
}
const PROGRAMME: DependencyMilestone[] = [
  m(1, "Enabling works", "2026-02-06", [], "2026-02-06"),
  m(2, "Frame and envelope", "2026-05-15", [1]),
  m(3, "Generators delivered", "2026-06-19", [1]),
  m(4, "Generator commissioning (L3)", "2026-08-28", [3]),
  m(5, "Chillers commissioned (L3)", "2026-08-14", [2]),
  m(6, "Integrated systems test (L5)", "2026-10-02", [4, 5]),
  m(7, "Hall 2A ready for service", "2026-10-16", [6, 99 /* unknown: skipped */]),
];

describe("drivingChain", () => {
  it("follows the latest-finishing predecessor back to a milestone with none", () => {
    expect(drivingChain(7, PROGRAMME).map((l) => l.name)).toEqual([
      "Hall 2A ready for service",
      "Integrated systems test (L5)",
      "Generator commissioning (L3)",
      "Generators delivered",
      "Enabling works",
    ]);
  });

  it("reports each link's finish (actual, else forecast, else baseline)", () => {
    expect(drivingChain(2, PROGRAMME)).toEqual([
      { id: 2, name: "Frame and envelope", finish: "2026-05-15" },
      { id: 1, name: "Enabling works", finish: "2026-02-06" },
    ]);
    expect(drivingChain(9, [{ id: 9, name: "No forecast", baselineFinish: "2026-03-03", forecastFinish: null, actualFinish: null }])).toEqual([
      { id: 9, name: "No forecast", finish: "2026-03-03" },
    ]);
  });

  it("switches driver when another predecessor's forecast moves later", () => {
    const moved = PROGRAMME.map((x) => (x.id === 5 ? { ...x, forecastFinish: "2026-09-04" } : x));
    expect(drivingChain(7, moved).map((l) => l.id)).toEqual([7, 6, 5, 2, 1]);
  });

  it("breaks a tie on the finish date by the smaller id", () => {
    const tie = PROGRAMME.map((x) => (x.id === 5 ? { ...x, forecastFinish: "2026-08-28" } : x));
    expect(drivingChain(6, tie).map((l) => l.id)).toEqual([6, 4, 3, 1]);
  });

  it("is empty for an unknown milestone and stops at a cycle instead of looping", () => {
    expect(drivingChain(42, PROGRAMME)).toEqual([]);
    const loop = [m(1, "A", "2026-01-01", [2]), m(2, "B", "2026-01-02", [1])];
    expect(drivingChain(1, loop).map((l) => l.id)).toEqual([1, 2]);
  });
});

describe("projectDrivers", () => {
  it("names the milestone with the latest forecast finish and its chain", () => {
    const drivers = projectDrivers(PROGRAMME);
    expect(drivers?.milestoneId).toBe(7);
    expect(drivers?.finish).toBe("2026-10-16");
    expect(drivers?.chain.map((l) => l.id)).toEqual([7, 6, 4, 3, 1]);
  });

  it("prefers an open milestone over a complete one on the same date", () => {
    const ms = [m(1, "Done", "2026-05-01", [], "2026-05-01"), m(2, "Open", "2026-05-01")];
    expect(projectDrivers(ms)?.milestoneId).toBe(2);
  });

  it("is null for an empty programme", () => {
    expect(projectDrivers([])).toBeNull();
  });
});
