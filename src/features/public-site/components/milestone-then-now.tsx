import type { MilestoneSnapshot, PostMilestone } from "#shared/schemas/posts.ts";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { longDate, snapshotDate } from "../words.ts";

function Snapshot({ label, s, when }: { label: string; s: MilestoneSnapshot; when?: string }) {
  const d = snapshotDate(s);
  return (
    <div className="min-w-0 border border-rule bg-paper/60 p-3" data-testid={`milestone-${label.toLowerCase()}`}>
      <p className="label-caps">
        {label}
        {when ? ` · ${when}` : ""}
      </p>
      <p className="mt-1">
        <StatusMark status={s.status} />
      </p>
      <p className="mt-1 text-sm">
        {d.word} {longDate(d.date)}
      </p>
      <p className="text-sm text-ink-soft tabular">{Math.round(s.percentComplete)}% complete</p>
    </div>
  );
}

/**
 * The milestones an update reported: as they stood when it was published and, where
 * something has moved since, as they stand now, side by side.
 */
export function MilestonesThenNow({ milestones, publishedOn }: { milestones: readonly PostMilestone[]; publishedOn: string | null }) {
  if (milestones.length === 0) return null;
  return (
    <section aria-labelledby="then-now" className="mt-10 border-t-2 border-ink pt-4">
      <h2 id="then-now" className="text-lg font-semibold">
        Milestones in this update
      </h2>
      <p className="mt-1 text-sm text-ink-soft">Each as it stood when this update was published{publishedOn ? ` (${publishedOn})` : ""}, and today where it has moved since.</p>
      <ul className="mt-4 flex flex-col gap-4">
        {milestones.map((m) => (
          <li key={m.id} data-testid="post-milestone" data-milestone-id={m.id}>
            <h3 className="font-semibold">{m.name}</h3>
            <div className="mt-2 grid gap-2 sm:grid-cols-2">
              {m.then ? <Snapshot label="Then" s={m.then} when={publishedOn ?? undefined} /> : null}
              {m.now && (m.changed || !m.then) ? <Snapshot label="Now" s={m.now} /> : null}
            </div>
            {m.then && m.now && !m.changed ? <p className="mt-1 text-sm text-ink-soft">Unchanged since.</p> : null}
            {m.then && !m.now ? <p className="mt-1 text-sm text-ink-soft">No longer published.</p> : null}
          </li>
        ))}
      </ul>
    </section>
  );
}
