import type { Role } from "#shared/schemas/common.ts";
import { workflowStep } from "#shared/domain/publishing-workflow.ts";
import type { PostStatus, WorkflowAction } from "#shared/schemas/publishing.ts";
import { Button } from "./button.tsx";

const LABEL: Record<WorkflowAction, string> = {
  submit: "Submit for review",
  approve: "Approve",
  return: "Return with comments",
  publish: "Publish",
  schedule: "Schedule…",
  withdraw: "Withdraw",
};

const ORDER: readonly WorkflowAction[] = ["submit", "approve", "publish", "schedule", "return", "withdraw"];

/** The workflow steps open to this person now, in the order they are usually taken. */
export function openActions(status: PostStatus, role: Role, ownWork: boolean, offered: readonly WorkflowAction[] = ORDER): WorkflowAction[] {
  return ORDER.filter((a) => offered.includes(a) && workflowStep(a, status, role, ownWork).ok);
}

/**
 * The buttons of the publishing workflow (the same rules as the server's, from the
 * shared schema), so each role sees only the steps it may take.
 */
export function WorkflowActions({
  status,
  role,
  ownWork,
  offered,
  busy,
  onAction,
}: {
  status: PostStatus;
  role: Role;
  ownWork: boolean;
  offered?: readonly WorkflowAction[];
  busy?: WorkflowAction | null;
  onAction: (a: WorkflowAction) => void;
}) {
  const actions = openActions(status, role, ownWork, offered);
  if (actions.length === 0) return null;
  return (
    <div className="flex flex-wrap gap-2" role="group" aria-label="Publishing">
      {actions.map((a) => (
        <Button
          key={a}
          variant={a === "publish" || (a === "submit" && role === "marketing") || (a === "approve" && !actions.includes("publish")) ? "primary" : a === "withdraw" ? "danger" : "secondary"}
          busy={busy === a}
          disabled={Boolean(busy) && busy !== a}
          onClick={() => onAction(a)}
        >
          {a === "withdraw" && status === "scheduled" ? "Cancel the schedule" : LABEL[a]}
        </Button>
      ))}
    </div>
  );
}
