import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient, type QueryKey } from "@tanstack/react-query";
import { useEffect, useRef, useState } from "react";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import type { PostStatus } from "#shared/schemas/publishing.ts";
import { REVIEW_LINK_DEFAULT_DAYS, REVIEW_LINK_MAX_DAYS, ReviewLinkInputSchema, type ReviewContentKind, type ReviewLink, type ReviewLinkInput } from "#shared/schemas/review-links.ts";
import { Button } from "../components/ui/button.tsx";
import { TextField } from "../components/ui/field.tsx";
import { ShownOnceAddress } from "../components/ui/shown-once-address.tsx";
import { Notice, Sheet, Spinner } from "../components/ui/sheet.tsx";
import { applyApiError, formatInstant } from "./format.ts";
import { useCreateReviewLink, useReviewLinks, useRevokeReviewLink } from "./review-links.ts";

const OPEN_FOR_REVIEW: readonly PostStatus[] = ["draft", "in_review"];

/** A link's state in words and shape: live links are in force (●); expired and revoked ones have ended (✕). */
const STATE_WORDS: Record<ReviewLink["state"], string> = { live: "● Open", expired: "✕ Expired", revoked: "✕ Withdrawn" };
const VERDICT_WORDS = { looks_right: "✓ Looks right", needs_changes: "▲ Needs changes" } as const;

type FormValues = z.input<typeof ReviewLinkInputSchema>;

/**
 * "Review links" in an editor of a saved update or photo story: a named outside reviewer gets a
 * link to the revision as it now stands, readable without an account until it expires or is
 * withdrawn. The link is shown once, when made; the list says who opened it and what they answered.
 */
export function ReviewLinksSheet({ kind, id, status, zone, historyKey }: { kind: ReviewContentKind; id: number; status: PostStatus; zone: string; historyKey: QueryKey }) {
  const links = useReviewLinks(kind, id);
  // An outside reviewer's answer is also an entry of the item's history: when the list shows a new
  // opening or answer (fetched again on focus, or after a link was made or withdrawn), so does the history.
  const qc = useQueryClient();
  const seen = useRef<number | null>(null);
  const eventCount = links.data ? links.data.links.reduce((n, l) => n + l.events.length + (l.revokedAt ? 1 : 0), 0) : null;
  useEffect(() => {
    if (eventCount === null) return;
    if (seen.current !== null && seen.current !== eventCount) void qc.invalidateQueries({ queryKey: historyKey });
    seen.current = eventCount;
  }, [eventCount, historyKey, qc]);
  const create = useCreateReviewLink(kind, id);
  const revoke = useRevokeReviewLink(kind, id);
  const [made, setMade] = useState<{ url: string; copied: boolean } | null>(null);
  const [copyError, setCopyError] = useState<string | null>(null);
  const form = useForm<FormValues, unknown, ReviewLinkInput>({ resolver: zodResolver(ReviewLinkInputSchema), defaultValues: { name: "", email: "", organisation: "", days: REVIEW_LINK_DEFAULT_DAYS } });
  const { errors } = form.formState;
  const open = OPEN_FOR_REVIEW.includes(status);

  const onSubmit = form.handleSubmit((values) =>
    create.mutateAsync({ ...values, organisation: values.organisation || undefined }).then(
      (link) => {
        setMade({ url: link.url, copied: false });
        setCopyError(null);
        form.reset({ name: "", email: "", organisation: "", days: REVIEW_LINK_DEFAULT_DAYS });
      },
      (e: unknown) => applyApiError(e, form.setError as never, "The link was not made."),
    ),
  );

  const onCopy = async () => {
    if (!made) return;
    try {
      await navigator.clipboard.writeText(made.url);
      setMade({ ...made, copied: true });
    } catch {
      setCopyError("Copying was not allowed here: select the address and copy it yourself.");
    }
  };

  return (
    <Sheet label="Review links">
      <p className="text-sm text-ink-soft">Let someone outside the office read this revision and answer, without an account. Each link is for one named person and ends when it expires or you withdraw it.</p>
      {open ? (
        <form onSubmit={(e) => void onSubmit(e)} className="mt-3 flex flex-col gap-2" noValidate aria-label="Make a review link">
          <TextField label="Reviewer's name" autoComplete="off" {...form.register("name")} error={errors.name?.message} maxLength={200} />
          <TextField label="Reviewer's e-mail" type="email" autoComplete="off" {...form.register("email")} error={errors.email?.message} />
          <TextField label="Organisation (optional)" autoComplete="off" {...form.register("organisation")} error={errors.organisation?.message} maxLength={200} />
          <TextField label="Days it stays open" type="number" min={1} max={REVIEW_LINK_MAX_DAYS} {...form.register("days")} error={errors.days?.message} hint={`At most ${REVIEW_LINK_MAX_DAYS} days.`} />
          {errors.root?.message ? (
            <p role="alert" className="text-sm text-bad">
              ✕ {errors.root.message}
            </p>
          ) : null}
          <Button type="submit" size="sm" busy={create.isPending}>
            Make the link
          </Button>
        </form>
      ) : (
        <p className="mt-3 text-sm">Links are made for drafts and work in review. Earlier links are listed below.</p>
      )}
      {made ? (
        <ShownOnceAddress label="The review link (shown only now)" url={made.url} onCopy={() => void onCopy()} testId="review-link-url">
          <p className="mt-1 text-sm" role="status">
            {made.copied ? "✓ Copied. Send it to the reviewer yourself." : "Send it to the reviewer yourself: Plumbline does not e-mail it."}
          </p>
          {copyError ? (
            <p className="text-sm text-bad" role="alert">
              ✕ {copyError}
            </p>
          ) : null}
        </ShownOnceAddress>
      ) : null}
      <div className="mt-4">
        {links.isPending ? <Spinner label="Loading review links" /> : null}
        {links.isError ? <Notice tone="error">{links.error.message}</Notice> : null}
        {links.data?.links.length === 0 ? <p className="text-sm text-ink-soft">No review links yet.</p> : null}
        <ul className="flex flex-col gap-3" aria-label="Review links made">
          {links.data?.links.map((l) => (
            <ReviewLinkRow key={l.id} link={l} zone={zone} revoking={revoke.isPending && revoke.variables === l.id} onRevoke={() => revoke.mutate(l.id)} />
          ))}
        </ul>
      </div>
    </Sheet>
  );
}

function ReviewLinkRow({ link, zone, revoking, onRevoke }: { link: ReviewLink; zone: string; revoking: boolean; onRevoke: () => void }) {
  const openings = link.events.filter((e) => e.kind === "opened").length;
  const answers = link.events.filter((e) => e.kind === "answered");
  return (
    <li className="border-t border-rule pt-2 text-sm" data-testid="review-link-row">
      <p className="font-medium">
        {link.reviewer.name}
        {link.reviewer.organisation ? `, ${link.reviewer.organisation}` : ""}
      </p>
      <p className="text-ink-soft">
        {STATE_WORDS[link.state]} · revision {link.revisionNumber} · {link.state === "revoked" ? `withdrawn ${formatInstant(link.revokedAt, zone)}` : `${link.state === "live" ? "until" : "ended"} ${formatInstant(link.expiresAt, zone)}`}
      </p>
      <p className="text-ink-soft">
        {openings === 0 ? "Not opened yet" : `Opened ${openings} ${openings === 1 ? "time" : "times"}`} · made by {link.createdBy.name}
      </p>
      {answers.length ? (
        <ul className="mt-1 flex flex-col gap-1" aria-label={`Answers from ${link.reviewer.name}`}>
          {answers.map((a) => (
            <li key={a.at}>
              <span className="font-medium">{VERDICT_WORDS[a.verdict ?? "looks_right"]}</span> <span className="text-ink-soft">on revision {a.revisionNumber}, {formatInstant(a.at, zone)}</span>
              {a.comment ? <p className="whitespace-pre-line">{a.comment}</p> : null}
            </li>
          ))}
        </ul>
      ) : null}
      {link.state === "live" ? (
        <Button size="sm" variant="danger" className="mt-1" busy={revoking} onClick={onRevoke}>
          Withdraw this link
        </Button>
      ) : null}
    </li>
  );
}
