import type { MilestoneMove } from "#shared/domain/programme-changes.ts";
import { formatDate } from "../../../lib/format.ts";
import type { MilestoneMovesRow } from "#shared/schemas/programme.ts";
import { AUDIENCE_WORD } from "../words.ts";

function days(n: number | undefined): string {
  const d = Math.abs(n ?? 0);
  return `${d} day${d === 1 ? "" : "s"}`;
}

/** One net move of a milestone in words. */
export function describeMove(move: MilestoneMove): string {
  switch (move.kind) {
    case "completed":
      return `Completed on ${formatDate(move.to)}`;
    case "reopened":
      return `Reopened (it had been recorded as finished on ${formatDate(move.from)})`;
    case "rebaselined":
      return `Re-baselined: ${formatDate(move.from)} → ${formatDate(move.to)} (${(move.days ?? 0) >= 0 ? "+" : "−"}${days(move.days)})`;
    case "later":
      return `Forecast ${days(move.days)} later: ${formatDate(move.from)} → ${formatDate(move.to)}`;
    case "earlier":
      return `Forecast ${days(move.days)} earlier: ${formatDate(move.from)} → ${formatDate(move.to)}`;
    case "progress":
      return `Progress ${move.from ?? 0}% → ${move.to ?? 0}%`;
    case "audience_changed":
      return `Now shown to: ${AUDIENCE_WORD[move.to as keyof typeof AUDIENCE_WORD] ?? move.to}`;
    case "removed":
      return "Removed from the programme: it no longer counts in the figures";
    case "restored":
      return "Put back into the programme";
  }
}

const MARK: Record<MilestoneMove["kind"], string> = {
  removed: "✕",
  restored: "↺",
  completed: "●",
  reopened: "○",
  rebaselined: "◇",
  later: "▶",
  earlier: "◀",
  progress: "+",
  audience_changed: "⇄",
};

/** "What moved" between two dates, milestone by milestone, with the notes left at the time. */
export function MovesList({ moves, from, to }: { moves: MilestoneMovesRow[]; from: string; to: string }) {
  if (moves.length === 0) return <p className="text-sm text-ink-soft">Nothing moved between {formatDate(from)} and {formatDate(to)}.</p>;
  return (
    <ul className="flex flex-col divide-y divide-rule" data-testid="moves">
      {moves.map((m) => (
        <li key={m.milestoneId} className="py-2">
          <p className="font-medium">{m.milestoneName}</p>
          <ul className="text-sm">
            {m.moves.map((mv, i) => (
              <li key={i} className="flex gap-2">
                <span aria-hidden className="w-3 text-ink-faint">
                  {MARK[mv.kind]}
                </span>
                <span>
                  {describeMove(mv)}
                  {mv.notes.length > 0 ? <span className="font-serif text-ink-soft"> — “{mv.notes.join("”; “")}”</span> : null}
                </span>
              </li>
            ))}
          </ul>
        </li>
      ))}
    </ul>
  );
}
