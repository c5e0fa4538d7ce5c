import type { Audience } from "#shared/schemas/common.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";

/**
 * The problems of linked milestones: `existing` are the project's milestones (all audiences),
 * `visible` those the content's audience may see.
 */
export function milestoneProblems(
  ids: readonly number[],
  existing: ReadonlyMap<number, { name: string }>,
  visible: ReadonlySet<number>,
  audience: Audience,
): PublishingProblem[] {
  const problems: PublishingProblem[] = [];
  for (const id of ids) {
    const m = existing.get(id);
    if (!m) problems.push({ code: "milestone_missing", milestoneId: id, message: `Linked milestone #${id} no longer exists in this project's programme.` });
    else if (!visible.has(id)) problems.push({ code: "milestone_not_visible", milestoneId: id, message: `Linked milestone “${m.name}” is not visible to the ${audience} audience of this content.` });
  }
  return problems;
}
