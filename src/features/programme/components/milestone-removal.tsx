import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { toast } from "sonner";
import { MilestoneRemovalInputSchema, type Milestone, type MilestoneRemovalInput } from "#shared/schemas/programme.ts";
import { Button } from "../../../components/ui/button.tsx";
import { TextAreaField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { applyFieldErrors, formatInstant } from "../../../lib/format.ts";
import { milestonesQueryOptions, REMOVED_ONLY, useDeleteMilestone, useMilestoneRemoval } from "../api.ts";

/**
 * Taking a milestone out of the programme, or putting it back, always with a reason that its
 * history keeps. Deleting outright is offered only for one entered by mistake; the server
 * refuses it for anything on record (in a baseline, linked, or moved) and says so.
 */
export function MilestoneRemoval({ slug, milestone, timeZone, onDone }: { slug: string; milestone: Milestone; timeZone: string; onDone: () => void }) {
  const removal = useMilestoneRemoval(slug);
  const del = useDeleteMilestone(slug);
  const [refusal, setRefusal] = useState<string | null>(null);
  const form = useForm<MilestoneRemovalInput>({ resolver: zodResolver(MilestoneRemovalInputSchema), defaultValues: { reason: "" } });
  const removed = milestone.removal;
  const action = removed ? "restore" : "remove";

  const onSubmit = form.handleSubmit(async (input) => {
    setRefusal(null);
    try {
      await removal.mutateAsync({ id: milestone.id, action, input });
      toast.success(removed ? `${milestone.name} is back in the programme` : `${milestone.name} was removed from the programme`);
      form.reset({ reason: "" });
      onDone();
    } catch (e) {
      if (e instanceof ApiError && Object.keys(e.fields).length) applyFieldErrors(e.fields, form.setError);
      else setRefusal(e instanceof Error ? e.message : String(e));
    }
  });

  const onDelete = async () => {
    setRefusal(null);
    try {
      await del.mutateAsync({ id: milestone.id });
      toast.success(`${milestone.name} was deleted`);
      onDone();
    } catch (e) {
      setRefusal(e instanceof Error ? e.message : String(e));
    }
  };

  return (
    <section aria-labelledby="milestone-removal-h" className="flex flex-col gap-3 border-t border-rule pt-4">
      <h3 id="milestone-removal-h" className="font-semibold">
        {removed ? "Removed from the programme" : "Remove from the programme"}
      </h3>
      {removed ? (
        <p className="text-sm">
          Removed {formatInstant(removed.at, timeZone)}
          {removed.by ? ` by ${removed.by}` : ""}: <span className="font-serif text-ink-soft">“{removed.reason}”</span>. It no longer counts in any figure; its history stays.
        </p>
      ) : (
        <p className="text-sm text-ink-soft">
          It leaves every figure (percent complete, planned value, counts, forecast completion) and is reported as removed in “what moved” and in digests to those who could see it. Its history stays.
        </p>
      )}
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-2" aria-label={removed ? "Restore to the programme" : "Remove from the programme"}>
        <TextAreaField
          label={removed ? "Reason for restoring" : "Reason for removing"}
          rows={2}
          hint="Kept in the milestone's history and shown with the change."
          error={form.formState.errors.reason?.message}
          {...form.register("reason")}
        />
        <div className="flex flex-wrap items-center gap-2">
          <Button type="submit" variant={removed ? "primary" : "danger"} busy={removal.isPending}>
            {removed ? "Restore to the programme" : "Remove from the programme"}
          </Button>
          {removed ? null : (
            <Button type="button" size="sm" variant="ghost" busy={del.isPending} onClick={() => void onDelete()}>
              Delete instead (entered by mistake)
            </Button>
          )}
        </div>
      </form>
      {refusal ? <Notice tone="caution">{refusal}</Notice> : null}
    </section>
  );
}

/** The milestones removed from the programme, each opening its record (history, reason, restore); the page's loader primed them. */
export function RemovedMilestones({ slug, timeZone, onOpen }: { slug: string; timeZone: string; onOpen: (m: Milestone) => void }) {
  const removed = useSuspenseQuery(milestonesQueryOptions(slug, REMOVED_ONLY));
  if (removed.data.length === 0) return <p className="text-sm text-ink-soft">No milestone has been removed from the programme.</p>;
  return (
    <ul className="flex flex-col divide-y divide-rule text-sm" aria-label="Milestones removed from the programme">
      {removed.data.map((m) => (
        <li key={m.id} className="py-2">
          <button type="button" className="text-left font-medium underline decoration-rule-strong underline-offset-4 hover:decoration-ink" onClick={() => onOpen(m)}>
            {m.name}
          </button>
          <span className="ml-2 text-xs text-ink-faint">
            removed {m.removal ? formatInstant(m.removal.at, timeZone) : ""}
            {m.removal?.by ? ` · ${m.removal.by}` : ""}
          </span>
          {m.removal ? <p className="font-serif text-ink-soft">“{m.removal.reason}”</p> : null}
        </li>
      ))}
    </ul>
  );
}
