import type { DecisionAnswer, DecisionStatus } from "#shared/schemas/decisions.ts";

export const STATUS_WORD: Record<DecisionStatus, string> = { open: "Open", decided: "Decided", withdrawn: "Withdrawn" };

/** "12 days left", "Due today", "3 days overdue"; for a closed one, nothing. */
export function daysLeftWords(d: Pick<DecisionAnswer, "daysLeft" | "status">): string {
  if (d.status !== "open" || d.daysLeft === null) return "";
  if (d.daysLeft === 0) return "Due today";
  if (d.daysLeft < 0) return `${-d.daysLeft} day${d.daysLeft === -1 ? "" : "s"} overdue`;
  return `${d.daysLeft} day${d.daysLeft === 1 ? "" : "s"} left`;
}

/** What a change in a decision's history was about. */
export const EVENT_FIELD_WORD: Record<string, string> = {
  created: "Requested",
  neededBy: "Needed by",
  status: "Status",
  outcome: "Outcome",
  withdrawn: "Withdrawn",
  title: "Title",
  audience: "Audience",
  options: "Options",
  recommendation: "Recommendation",
};

const STATUS_RANK: Record<DecisionStatus, number> = { open: 0, decided: 1, withdrawn: 2 };

/**
 * The order a reader needs: open requests first, overdue ones at the top, then by needed-by;
 * decided and withdrawn ones after, latest first. The server answers in this order; the page
 * keeps it whatever arrives.
 */
export function orderDecisions<T extends Pick<DecisionAnswer, "status" | "overdue" | "neededBy" | "id">>(list: readonly T[]): T[] {
  return [...list].sort(
    (a, b) =>
      STATUS_RANK[a.status] - STATUS_RANK[b.status] ||
      (a.status === "open" ? Number(b.overdue) - Number(a.overdue) || a.neededBy.localeCompare(b.neededBy) : b.neededBy.localeCompare(a.neededBy)) ||
      a.id - b.id,
  );
}
