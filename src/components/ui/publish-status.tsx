type PublishStatus = "draft" | "in_review" | "approved" | "scheduled" | "published" | "withdrawn";

export const PUBLISH_STATUS_WORD: Record<PublishStatus, string> = {
  draft: "Draft",
  in_review: "In review",
  approved: "Approved",
  scheduled: "Scheduled",
  published: "Published",
  withdrawn: "Withdrawn",
};

/** Each state of the publishing workflow has its own outline, so no one needs colour to tell them apart. */
function Shape({ status }: { status: PublishStatus }) {
  const c = "currentColor";
  switch (status) {
    case "draft":
      return <circle cx="6" cy="6" r="4.5" fill="none" stroke={c} strokeWidth="1.4" strokeDasharray="2 1.6" />;
    case "in_review":
      return (
        <>
          <circle cx="6" cy="6" r="4.6" fill="none" stroke={c} strokeWidth="1.4" />
          <path d="M6 1.4a4.6 4.6 0 0 1 0 9.2z" fill={c} />
        </>
      );
    case "approved":
      return <path d="M1.8 6.4l2.7 2.7 5.7-6" fill="none" stroke={c} strokeWidth="1.9" />;
    case "scheduled":
      return (
        <>
          <circle cx="6" cy="6" r="4.6" fill="none" stroke={c} strokeWidth="1.4" />
          <path d="M6 3.2V6l2 1.4" fill="none" stroke={c} strokeWidth="1.4" />
        </>
      );
    case "published":
      return <rect x="1.3" y="1.3" width="9.4" height="9.4" fill={c} />;
    case "withdrawn":
      return (
        <>
          <rect x="1.5" y="1.5" width="9" height="9" fill="none" stroke={c} strokeWidth="1.4" />
          <path d="M2 10L10 2" stroke={c} strokeWidth="1.4" />
        </>
      );
  }
}

const TONE: Record<PublishStatus, string> = {
  draft: "text-ink-soft",
  in_review: "text-watch",
  approved: "text-good",
  scheduled: "text-ink",
  published: "text-ink",
  withdrawn: "text-bad",
};

/** A post's or story's state as shape and word. */
export function PublishStatusMark({ status, className = "" }: { status: PublishStatus; className?: string }) {
  return (
    <span className={`inline-flex items-center gap-1.5 whitespace-nowrap font-medium ${TONE[status]} ${className}`} data-status={status}>
      <svg aria-hidden width="12" height="12" viewBox="0 0 12 12" className="shrink-0">
        <Shape status={status} />
      </svg>
      {PUBLISH_STATUS_WORD[status]}
    </span>
  );
}
