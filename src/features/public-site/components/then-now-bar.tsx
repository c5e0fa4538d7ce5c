import { toDayNumber } from "#shared/domain/calendar.ts";
import type { MilestoneSnapshot, PostMilestone } from "#shared/schemas/posts.ts";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { longDate, snapshotDate } from "../words.ts";

/*
 * A linked milestone's movement since the update was published, as one small bar (decision 055):
 * on a short time axis, a thin tick where the date stood then, a tall tick where it stands now,
 * and an ink bar between them (the move). Plain HTML like the readiness bars (decision 050); the
 * drawing is for the eye only, and a sentence under it says every fact it shows.
 */

export interface ThenNow {
  thenDate: string | null;
  nowDate: string | null;
  /** "Forecast" or "Finished", for the date it stands at now. */
  nowWord: string;
  /** Calendar days from then to now (positive: later); null when either date is missing. */
  shiftDays: number | null;
  /** Positions on the axis, percent of its width (null when there is no such date). */
  thenAt: number | null;
  nowAt: number | null;
  /** The movement in words: the reader without the picture loses nothing. */
  words: string;
}

const days = (n: number) => `${n} ${n === 1 ? "day" : "days"}`;

/** The axis spans both dates with a margin either side (at least a fortnight wide), so a small move still shows. */
function axisOf(dates: number[]): (d: number) => number {
  const lo = Math.min(...dates);
  const hi = Math.max(...dates);
  const pad = Math.max(7, Math.round((hi - lo) * 0.15));
  const start = lo - pad;
  const span = hi + pad - start;
  return (d) => Math.round(((d - start) / span) * 1000) / 10;
}

/** What the bar and its sentence show for one milestone: the date it stood at then and now, and the move between. */
export function thenNowOf(m: Pick<PostMilestone, "then" | "now">): ThenNow {
  const then = m.then ? snapshotDate(m.then) : null;
  const now = m.now ? snapshotDate(m.now) : null;
  const thenDate = then?.date ?? null;
  const nowDate = now?.date ?? null;
  const nowWord = now?.word ?? "Forecast";
  const known = [thenDate, nowDate].filter((d): d is string => d !== null).map(toDayNumber);
  const at = known.length ? axisOf(known) : null;
  const thenAt = thenDate && at ? at(toDayNumber(thenDate)) : null;
  const nowAt = nowDate && at ? at(toDayNumber(nowDate)) : null;
  const shiftDays = thenDate && nowDate ? toDayNumber(nowDate) - toDayNumber(thenDate) : null;
  let words: string;
  if (!m.now) words = thenDate ? `When published: ${then!.word.toLowerCase()} ${longDate(thenDate)}. No longer published.` : "No longer published.";
  else if (!m.then) words = nowDate ? `${nowWord} ${longDate(nowDate)}.` : "No date yet.";
  else if (!thenDate || !nowDate) words = nowDate ? `${nowWord} ${longDate(nowDate)}; no date when published.` : "No date now.";
  else if (shiftDays === 0) words = `${nowWord} ${longDate(nowDate)}, the same date as when published.`;
  else {
    const dir = shiftDays! > 0 ? "later" : "earlier";
    words = `${nowWord} ${longDate(nowDate)}, ${days(Math.abs(shiftDays!))} ${dir} than the ${then!.word.toLowerCase()} date when published (${longDate(thenDate)}).`;
  }
  return { thenDate, nowDate, nowWord, shiftDays, thenAt, nowAt, words };
}

const percent = (s: MilestoneSnapshot | null) => (s ? Math.round(s.percentComplete) : null);

/** One linked milestone: its name, where it stands now (word and shape), the bar and the sentence. */
export function ThenNowBar({ milestone, publishedOn }: { milestone: PostMilestone; publishedOn: string | null }) {
  const t = thenNowOf(milestone);
  const before = percent(milestone.then);
  const after = percent(milestone.now);
  const lo = t.thenAt !== null && t.nowAt !== null ? Math.min(t.thenAt, t.nowAt) : null;
  const width = t.thenAt !== null && t.nowAt !== null ? Math.abs(t.nowAt - t.thenAt) : 0;
  return (
    <div className="border border-rule bg-sheet px-4 py-3 font-sans" data-testid="post-milestone" data-milestone-id={milestone.id}>
      <p className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <span className="font-semibold">{milestone.name}</span>
        {milestone.now ? <StatusMark status={milestone.now.status} className="text-sm" /> : null}
      </p>
      {t.thenAt !== null || t.nowAt !== null ? (
        <div className="relative mt-3 h-5" aria-hidden="true" data-testid="then-now-bar">
          <div className="absolute inset-x-0 top-1/2 h-px bg-rule-strong" />
          {lo !== null && width > 0 ? <div className="absolute top-1/2 h-1.5 -translate-y-1/2 bg-ink" style={{ left: `${lo}%`, width: `${width}%` }} data-testid="then-now-move" /> : null}
          {t.thenAt !== null && milestone.now ? <div className="absolute top-1 h-3 w-0.5 -translate-x-1/2 bg-ink-soft" style={{ left: `${t.thenAt}%` }} data-testid="then-mark" /> : null}
          {t.nowAt !== null ? <div className="absolute top-0 h-5 w-1 -translate-x-1/2 bg-ink" style={{ left: `${t.nowAt}%` }} data-testid="now-mark" /> : null}
        </div>
      ) : null}
      <p className="mt-2 text-sm" data-testid="then-now-words">
        {t.words}
      </p>
      {before !== null && after !== null && before !== after ? (
        <p className="text-sm text-ink-soft tabular">
          {before}% complete when published{publishedOn ? ` (${publishedOn})` : ""}, {after}% now.
        </p>
      ) : after !== null ? (
        <p className="text-sm text-ink-soft tabular">{after}% complete.</p>
      ) : null}
    </div>
  );
}
