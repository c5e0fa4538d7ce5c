import { Link } from "react-router-dom";
import { DIGESTS_DUE_WITHIN_DAYS, type WaitingKind } from "#shared/schemas/office.ts";
import { Sheet } from "../../components/ui/sheet.tsx";
import { formatInstant } from "../../lib/format.ts";
import { useWaiting } from "./api.ts";

/** What each kind is called (one, several) and where that work is done. */
const KINDS: Record<WaitingKind, { one: string; many: string; href: (slug: string) => string }> = {
  updates_to_review: { one: "update to review", many: "updates to review", href: (s) => `/office/updates?project=${s}&status=in_review` },
  photos_to_clear: { one: "photo to clear", many: "photos to clear", href: (s) => `/office/media/review?project=${s}` },
  new_enquiries: { one: "new enquiry", many: "new enquiries", href: () => "/office/enquiries?status=new" },
  digests_due: { one: `digest to send in the next ${DIGESTS_DUE_WITHIN_DAYS} days`, many: `digests to send in the next ${DIGESTS_DUE_WITHIN_DAYS} days`, href: () => "/office/digests" },
  decisions_overdue: { one: "decision overdue", many: "decisions overdue", href: (s) => `/office/decisions?project=${s}` },
  units_awaiting_commissioning: { one: "unit installed, awaiting commissioning", many: "units installed, awaiting commissioning", href: (s) => `/office/facility?project=${s}` },
};

/**
 * "Waiting for you": the office overview's first panel. The server counts only the work this
 * person's role does; each row links to the page where it is done.
 */
export function WaitingPanel() {
  const waiting = useWaiting();
  const items = waiting.data?.items ?? [];
  const several = new Set(items.map((i) => i.project.slug)).size > 1;
  return (
    <Sheet label="Today" title="Waiting for you" className="mb-6">
      {waiting.isPending ? (
        // The height of one row, so the panels below do not move when the counts arrive.
        <p className="min-h-11 text-sm text-ink-soft">Counting what is waiting…</p>
      ) : waiting.isError ? (
        <p className="min-h-11 text-sm text-ink-soft">What is waiting could not be read just now. Reload the page to try again.</p>
      ) : items.length === 0 ? (
        <p className="min-h-11 text-sm">Nothing waiting for you.</p>
      ) : (
        <ul className="grid gap-x-6 sm:grid-cols-2" data-testid="waiting-list">
          {items.map((i) => (
            <li key={`${i.kind}-${i.project.slug}`} className="border-b border-rule last:border-b-0 sm:[&:nth-last-child(2):nth-child(odd)]:border-b-0">
              <Link to={KINDS[i.kind].href(i.project.slug)} className="group flex min-h-11 items-baseline gap-3 py-2">
                <span className="w-10 shrink-0 text-right text-xl font-semibold tabular-nums" aria-hidden="true">
                  {i.count}
                </span>
                <span>
                  <span className="sr-only">{i.count} </span>
                  {/* Underlined at rest, so the row reads as a link without the accent colour (kept for a page's one primary action). */}
                  <span className="underline decoration-rule underline-offset-4 group-hover:decoration-ink">{i.count === 1 ? KINDS[i.kind].one : KINDS[i.kind].many}</span>
                  {several ? <span className="block text-sm text-ink-soft">{i.project.name}</span> : null}
                  {i.nextAt ? <span className="block text-sm text-ink-soft">first on {formatInstant(i.nextAt, i.project.timeZone)}</span> : null}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </Sheet>
  );
}
