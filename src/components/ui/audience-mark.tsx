import { AUDIENCE_WORD } from "../../lib/words.ts";

type Audience = "public" | "investor" | "internal";

const LOOK: Record<Audience, { word: string; className: string }> = {
  public: { word: AUDIENCE_WORD.public, className: "border-rule-strong text-ink-soft" },
  investor: { word: "For investors", className: "border-ink bg-ink text-sheet" },
  internal: { word: AUDIENCE_WORD.internal, className: "border-dashed border-ink text-ink" },
};

/**
 * Each audience has its own mark, apart from the status shapes (DEVELOPERS.md "Shapes"): a
 * broadcast (a point sending out two arcs: anyone), a keyhole (investors), a dashed square (staff).
 */
function AudienceShape({ audience }: { audience: Audience }) {
  return (
    <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0" data-shape={audience}>
      {audience === "public" ? (
        <g fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round">
          <circle cx="2.6" cy="9.4" r="1.2" fill="currentColor" stroke="none" />
          <path d="M2.4 5.6a4 4 0 0 1 4 4" />
          <path d="M2.4 1.8a7.8 7.8 0 0 1 7.8 7.8" />
        </g>
      ) : null}
      {audience === "investor" ? <path d="M6 1.2a2.9 2.9 0 0 1 1.45 5.41L8.4 10.8H3.6l.95-4.19A2.9 2.9 0 0 1 6 1.2z" fill="currentColor" /> : null}
      {audience === "internal" ? <rect x="1.5" y="1.5" width="9" height="9" fill="none" stroke="currentColor" strokeWidth="1.4" strokeDasharray="2 1.5" /> : null}
    </svg>
  );
}

/**
 * Who a post or story is for, by word and shape (never colour alone). On public lists
 * only non-public items need it, so `hidePublic` leaves public ones unmarked.
 */
export function AudienceMark({ audience, hidePublic = false, className = "" }: { audience: Audience; hidePublic?: boolean; className?: string }) {
  if (hidePublic && audience === "public") return null;
  const look = LOOK[audience];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap border px-1.5 py-0.5 text-xs font-semibold ${look.className} ${className}`} data-audience={audience}>
      <AudienceShape audience={audience} />
      {look.word}
    </span>
  );
}
