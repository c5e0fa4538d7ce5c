import type { PostMilestone } from "#shared/schemas/posts.ts";
import { ThenNowBar } from "./then-now-bar.tsx";

/** The ids of the milestones the update's body shows as blocks (the server's `aside data-milestone-id`). */
export function milestoneIdsInBody(html: string): Set<number> {
  return new Set([...html.matchAll(/<aside\b[^>]*\bdata-milestone-id="(\d+)"/g)].map((m) => Number(m[1])));
}

/**
 * The milestones an update reported, each shown once with its movement since publication as a
 * then-and-now bar (decision 055): those the body names are drawn where the body names them
 * (see PostBody), the rest here, after the body.
 */
export function MilestonesThenNow({ milestones, publishedOn, inBody = new Set() }: { milestones: readonly PostMilestone[]; publishedOn: string | null; inBody?: ReadonlySet<number> }) {
  const rest = milestones.filter((m) => !inBody.has(m.id));
  if (rest.length === 0) return null;
  return (
    <section aria-labelledby="then-now" className="mt-10 border-t-2 border-ink pt-4">
      <h2 id="then-now" className="text-lg font-semibold">
        Milestones in this update
      </h2>
      <p className="mt-1 text-sm text-ink-soft">Each as it stood when this update was published{publishedOn ? ` (${publishedOn})` : ""}, and where it stands today.</p>
      <ul className="mt-4 flex flex-col gap-3">
        {rest.map((m) => (
          <li key={m.id}>
            <ThenNowBar milestone={m} publishedOn={publishedOn} />
          </li>
        ))}
      </ul>
    </section>
  );
}
