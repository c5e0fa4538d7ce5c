import type { ReviewVerdict } from "#shared/schemas/review-links.ts";
import { transactionalMail } from "../mail/mail.layout.ts";

export const VERDICT_WORDS: Record<ReviewVerdict, string> = { looks_right: "looks right", needs_changes: "needs changes" };

/** The note to a post's or story's author that an outside reviewer answered: who, what, on which revision, and where to read it. */
export function reviewAnswerNotification(p: {
  reviewer: { name: string; organisation: string | null };
  kindName: string;
  title: string;
  verdict: ReviewVerdict;
  comment: string | null;
  revisionNumber: number;
  url: string;
}): { subject: string; html: string; text: string } {
  const who = p.reviewer.organisation ? `${p.reviewer.name} (${p.reviewer.organisation})` : p.reviewer.name;
  const body = transactionalMail({
    heading: `${who} says “${p.title}” ${VERDICT_WORDS[p.verdict]}`,
    paragraphs: [
      `${who} read revision ${p.revisionNumber} of the ${p.kindName} “${p.title}” through a review link and answered: ${VERDICT_WORDS[p.verdict]}.`,
      ...(p.comment ? [`Their comment: ${p.comment}`] : ["They left no comment."]),
      "The answer is kept with the review link in the editor.",
    ],
    action: { label: `Open the ${p.kindName}`, url: p.url },
    footer: `Plumbline site office. You receive this because you wrote this ${p.kindName}.`,
  });
  return { subject: `Review answer: “${p.title}” ${VERDICT_WORDS[p.verdict]} (${who})`, ...body };
}
