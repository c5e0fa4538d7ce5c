import { ReturnDialog as WorkflowReturnDialog } from "../../../components/ui/workflow-dialogs.tsx";

// The dialogs are shared with photo stories (src/components/ui/workflow-dialogs.tsx).
export { ScheduleDialog, zoneAbbreviation } from "../../../components/ui/workflow-dialogs.tsx";

/** The reviewer's comments, sent with the post back to its writer. */
export function ReturnDialog(props: { busy: boolean; error?: string; onClose: () => void; onReturn: (comment: string) => void }) {
  return <WorkflowReturnDialog {...props} hint="The writer sees this at the top of the update when they open it." />;
}
