/**
 * Finish-to-start dependencies between milestones: cycle detection (a programme with
 * a loop can never finish, so it is refused at input) and the chain of predecessors
 * that drives a forecast ("Hall 2A ready for service is driven by generator
 * commissioning").
 */
import { milestoneFinish, type MilestoneInput } from "./programme-health.ts";
import type { CalendarDate } from "./calendar.ts";

/** A finish-to-start dependency: `to` cannot finish before `from` does. */
export interface DependencyEdge {
  from: number;
  to: number;
}

/** The fields of a milestone the dependency functions read. */
export type DependencyMilestone = Pick<
  MilestoneInput,
  "id" | "name" | "baselineFinish" | "forecastFinish" | "actualFinish" | "dependsOn"
>;

/** One step of a driving chain. */
export interface DrivingLink {
  id: number;
  name: string;
  /** Actual finish, else forecast, else baseline (`YYYY-MM-DD`). */
  finish: CalendarDate;
}

/** The milestone that sets the programme's forecast completion, and what drives it. */
export interface ProjectDrivers {
  milestoneId: number;
  finish: CalendarDate;
  /** From that milestone back to a milestone with no predecessors. */
  chain: DrivingLink[];
}

/**
 * Finds a dependency cycle. Returns its milestone ids in dependency order — each id
 * is a predecessor of the next, and the last of the first — starting from the
 * smallest id so the same loop is always reported the same way; `[id]` for a
 * milestone that depends on itself; null when there is no cycle. Iterative, so a long
 * chain cannot overflow the stack.
 */
export function findCycle(edges: readonly DependencyEdge[]): number[] | null {
  const successors = new Map<number, number[]>();
  for (const { from, to } of edges) {
    if (!successors.has(from)) successors.set(from, []);
    if (!successors.has(to)) successors.set(to, []);
    (successors.get(from) as number[]).push(to);
  }
  const state = new Map<number, 1 | 2>(); // 1: on the current path, 2: fully explored
  for (const root of successors.keys()) {
    if (state.has(root)) continue;
    const path: number[] = [root];
    const nextIndex: number[] = [0];
    state.set(root, 1);
    while (path.length > 0) {
      const depth = path.length - 1;
      const node = path[depth] as number;
      const next = successors.get(node) as number[];
      const i = nextIndex[depth] as number;
      if (i >= next.length) {
        state.set(node, 2);
        path.pop();
        nextIndex.pop();
        continue;
      }
      nextIndex[depth] = i + 1;
      const child = next[i] as number;
      const seen = state.get(child);
      if (seen === 1) return rotateToSmallest(path.slice(path.indexOf(child)));
      if (seen === undefined) {
        state.set(child, 1);
        path.push(child);
        nextIndex.push(0);
      }
    }
  }
  return null;
}

function rotateToSmallest(cycle: number[]): number[] {
  let at = 0;
  for (let i = 1; i < cycle.length; i += 1) if ((cycle[i] as number) < (cycle[at] as number)) at = i;
  return [...cycle.slice(at), ...cycle.slice(0, at)];
}

/** Dependency edges (predecessor → dependant) declared by milestones' `dependsOn`. */
export function dependencyEdges(milestones: readonly Pick<MilestoneInput, "id" | "dependsOn">[]): DependencyEdge[] {
  const edges: DependencyEdge[] = [];
  for (const m of milestones) for (const from of m.dependsOn ?? []) edges.push({ from, to: m.id });
  return edges;
}

function linkOf(m: DependencyMilestone): DrivingLink {
  return { id: m.id, name: m.name, finish: milestoneFinish(m) };
}

/** Later finish wins; on the same date the smaller id, so the answer is stable. */
function drivesBefore(a: DrivingLink, b: DrivingLink): boolean {
  return a.finish > b.finish || (a.finish === b.finish && a.id < b.id);
}

/**
 * The chain of predecessors that sets a milestone's forecast: the milestone itself,
 * then at each step the predecessor with the latest finish (actual, else forecast,
 * else baseline; ties to the smaller id), ending at a milestone with no (known)
 * predecessors. Unknown predecessor ids are skipped; a cycle stops the chain rather
 * than looping. Empty when `milestoneId` is not among `milestones`.
 */
export function drivingChain(milestoneId: number, milestones: readonly DependencyMilestone[]): DrivingLink[] {
  const byId = new Map<number, DependencyMilestone>();
  for (const m of milestones) byId.set(m.id, m);
  const chain: DrivingLink[] = [];
  const visited = new Set<number>();
  let current = byId.get(milestoneId);
  while (current !== undefined && !visited.has(current.id)) {
    visited.add(current.id);
    chain.push(linkOf(current));
    let driver: DrivingLink | undefined;
    let driverMilestone: DependencyMilestone | undefined;
    for (const id of current.dependsOn ?? []) {
      const pred = byId.get(id);
      if (pred === undefined || visited.has(id)) continue;
      const link = linkOf(pred);
      if (driver === undefined || drivesBefore(link, driver)) {
        driver = link;
        driverMilestone = pred;
      }
    }
    current = driverMilestone;
  }
  return chain;
}

/**
 * What sets the programme's forecast completion: the milestone with the latest
 * finish (actual, else forecast, else baseline; on a tie an open milestone before a
 * complete one, then the smaller id) and its driving chain. Null for an empty programme.
 */
export function projectDrivers(milestones: readonly DependencyMilestone[]): ProjectDrivers | null {
  let last: DependencyMilestone | undefined;
  for (const m of milestones) {
    if (last === undefined) {
      last = m;
      continue;
    }
    const a = milestoneFinish(m);
    const b = milestoneFinish(last);
    const mOpen = m.actualFinish === null;
    const lastOpen = last.actualFinish === null;
    if (a > b || (a === b && ((mOpen && !lastOpen) || (mOpen === lastOpen && m.id < last.id)))) last = m;
  }
  if (last === undefined) return null;
  return { milestoneId: last.id, finish: milestoneFinish(last), chain: drivingChain(last.id, milestones) };
}
