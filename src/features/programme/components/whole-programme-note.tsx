import { WHOLE_PROGRAMME_NOTE } from "#shared/domain/programme-health.ts";

/**
 * A build has one set of headline figures, computed over every milestone of the programme for
 * every reader (decision 004); a page that lists only some milestones says so beside its figures,
 * so a reader does not recompute them from the list and wonder why they differ.
 */
export function WholeProgrammeNote({ className = "text-sm text-ink-soft" }: { className?: string }) {
  return (
    <p className={className} data-testid="whole-programme-note">
      {WHOLE_PROGRAMME_NOTE}
    </p>
  );
}
