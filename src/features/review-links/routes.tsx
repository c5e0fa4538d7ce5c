import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { useId, type ReactNode } from "react";
import { useForm } from "react-hook-form";
import { Link, useParams, useRouteError, useSearchParams } from "react-router-dom";
import type { z } from "zod";
import type { MediaPicture } from "#shared/schemas/media.ts";
import { ReviewAnswerInputSchema, type ReviewAnswerInput, type ReviewCopy } from "#shared/schemas/review-links.ts";
import { Button } from "../../components/ui/button.tsx";
import { TextAreaField } from "../../components/ui/field.tsx";
import { Picture } from "../../components/ui/picture.tsx";
import { Notice } from "../../components/ui/sheet.tsx";
import { ApiError } from "../../lib/api-client.ts";
import { applyApiError, formatInstant } from "../../lib/format.ts";
import type { RouteLoader } from "../../lib/loaders.ts";
import { useTitle } from "../../lib/use-title.ts";
import { AUDIENCE_WORD } from "../../lib/words.ts";
import { reviewCopyQueryOptions, useAnswerReview } from "./api.ts";

/*
 * /review/:token — one revision of a draft update or photo story for the outside reviewer the
 * link was made for, without an account (decision 060). Every screen says it is a draft not for
 * publication; search engines are told to keep none of it (here, in the HTML shell and in a header).
 */

const VERDICT_WORDS = { looks_right: "✓ Looks right", needs_changes: "▲ Needs changes" } as const;
const PROSE =
  "font-serif text-[1.075rem] leading-[1.7] text-ink [&_a]:underline [&_a]:underline-offset-4 [&_figcaption]:mt-2 [&_figcaption]:font-sans [&_figcaption]:text-sm [&_figcaption]:text-ink-soft [&_figure]:my-6 [&_h2]:mt-8 [&_h2]:mb-2 [&_h2]:font-sans [&_h2]:text-2xl [&_h2]:font-semibold [&_h3]:mt-6 [&_h3]:font-sans [&_h3]:text-xl [&_h3]:font-semibold [&_img]:h-auto [&_img]:max-w-full [&_li]:my-1 [&_ol]:list-decimal [&_ol]:pl-6 [&_p]:my-4 [&_ul]:list-disc [&_ul]:pl-6 [&_.milestone-block]:my-6 [&_.milestone-block]:border-l-4 [&_.milestone-block]:border-ink [&_.milestone-block]:bg-sheet [&_.milestone-block]:px-4 [&_.milestone-block]:py-3 [&_.milestone-block]:font-sans [&_.post-image-missing]:border [&_.post-image-missing]:border-dashed [&_.post-image-missing]:border-rule-strong [&_.post-image-missing]:p-4";

const latestOf = (search: URLSearchParams) => search.get("revision") === "latest";

export const reviewLoader: RouteLoader = (qc) => async ({ params, request }) => {
  await qc.ensureQueryData(reviewCopyQueryOptions(params.token ?? "", latestOf(new URL(request.url).searchParams)));
  return null;
};

/** On every screen of a review link, whatever it shows: the draft's status, sticky at the top. */
function DraftBanner() {
  return (
    <div role="note" aria-label="Draft — not for publication" className="sticky top-0 z-40 border-y-2 border-bad bg-[#fff4d6] px-4 py-2 text-center text-sm font-semibold text-ink" data-testid="draft-banner">
      <span aria-hidden>▲ </span>Draft — not for publication
    </div>
  );
}

/** The page's frame: the banner, and a robots tag React puts in the document's head. */
function ReviewFrame({ title, children }: { title: string; children: ReactNode }) {
  useTitle(title, "Draft for review");
  return (
    <>
      <meta name="robots" content="noindex" />
      <DraftBanner />
      <div className="mx-auto w-full max-w-3xl px-4 py-6 sm:py-10">{children}</div>
    </>
  );
}

function Photo({ picture, caption }: { picture: MediaPicture | null; caption: string | null }) {
  return (
    <figure className="my-6">
      {picture ? <Picture picture={picture} sizes="(min-width: 48rem) 45rem, 100vw" alt={picture.altText ?? ""} /> : <p className="border border-dashed border-rule-strong p-4 text-sm text-ink-soft">This photo is not shown through review links.</p>}
      {caption ? <figcaption className="mt-2 text-sm text-ink-soft">{caption}</figcaption> : null}
    </figure>
  );
}

function StoryItems({ items }: { items: ReviewCopy["items"] }) {
  return (
    <>
      {items.map((item, i) =>
        item.kind === "photo" ? (
          <Photo key={i} picture={item.media} caption={item.caption} />
        ) : (
          <figure key={i} className="my-6">
            <div className="grid grid-cols-1 gap-2 sm:grid-cols-2">
              <div>
                <p className="label-caps">Then</p>
                <Photo picture={item.before} caption={item.before?.takenAt ? `Taken ${item.before.takenAt.slice(0, 10)}` : null} />
              </div>
              <div>
                <p className="label-caps">Now</p>
                <Photo picture={item.after} caption={item.after?.takenAt ? `Taken ${item.after.takenAt.slice(0, 10)}` : null} />
              </div>
            </div>
            <figcaption className="text-sm text-ink-soft">
              {item.area}
              {item.caption ? ` — ${item.caption}` : ""}
            </figcaption>
          </figure>
        ),
      )}
    </>
  );
}

type AnswerValues = z.input<typeof ReviewAnswerInputSchema>;

function AnswerForm({ token, latest, copy }: { token: string; latest: boolean; copy: ReviewCopy }) {
  const answer = useAnswerReview(token, latest);
  const form = useForm<AnswerValues, unknown, ReviewAnswerInput>({ resolver: zodResolver(ReviewAnswerInputSchema), defaultValues: { comment: "" } });
  const { errors } = form.formState;
  const groupId = useId();
  const onSubmit = form.handleSubmit((values) =>
    answer.mutateAsync({ verdict: values.verdict, ...(values.comment ? { comment: values.comment } : {}) }).then(
      () => form.reset({ comment: "" }),
      (e: unknown) => applyApiError(e, form.setError as never, "Your answer was not sent."),
    ),
  );
  return (
    <section aria-labelledby={`${groupId}-h`} className="mt-10 border-t-2 border-ink pt-6">
      <h2 id={`${groupId}-h`} className="text-xl font-semibold">
        Your answer
      </h2>
      <p className="mt-1 text-sm text-ink-soft">It goes to the team that wrote this {copy.kind === "post" ? "update" : "photo story"}, with the revision you read (revision {copy.revisionNumber}).</p>
      <form onSubmit={(e) => void onSubmit(e)} noValidate className="mt-4 flex flex-col gap-3">
        <fieldset aria-describedby={errors.verdict ? `${groupId}-err` : undefined}>
          <legend className="text-sm font-medium">What do you think?</legend>
          <div className="mt-2 flex flex-wrap gap-4">
            <label className="flex items-center gap-2">
              <input type="radio" value="looks_right" {...form.register("verdict")} /> Looks right
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" value="needs_changes" {...form.register("verdict")} /> Needs changes
            </label>
          </div>
          {errors.verdict ? (
            <p id={`${groupId}-err`} role="alert" className="mt-1 text-sm text-bad">
              ✕ Choose “Looks right” or “Needs changes”.
            </p>
          ) : null}
        </fieldset>
        <TextAreaField label="Comment (optional)" rows={4} maxLength={4000} {...form.register("comment")} error={errors.comment?.message} hint="What should change, and where." />
        {errors.root?.message ? (
          <p role="alert" className="text-sm text-bad">
            ✕ {errors.root.message}
          </p>
        ) : null}
        <div>
          <Button type="submit" variant="primary" busy={answer.isPending}>
            Send my answer
          </Button>
        </div>
        {answer.isSuccess ? (
          <p role="status" className="text-sm">
            ✓ Thank you: your answer reached the team.
          </p>
        ) : null}
      </form>
      {copy.answers.length ? (
        <div className="mt-6">
          <h3 className="label-caps">Your answers so far</h3>
          <ul className="mt-2 flex flex-col gap-2 text-sm">
            {copy.answers.map((a) => (
              <li key={a.at}>
                <span className="font-medium">{VERDICT_WORDS[a.verdict]}</span> <span className="text-ink-soft">on revision {a.revisionNumber}, {formatInstant(a.at)}</span>
                {a.comment ? <p className="whitespace-pre-line">{a.comment}</p> : null}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </section>
  );
}

/** /review/:token */
export function ReviewPage() {
  const { token = "" } = useParams();
  const [search] = useSearchParams();
  const latest = latestOf(search);
  const copy = useSuspenseQuery(reviewCopyQueryOptions(token, latest)).data;
  return (
    <ReviewFrame title={copy.title}>
      <p className="label-caps">
        {copy.projectName} · {copy.kind === "post" ? "Update" : "Photo story"} for review
      </p>
      <h1 className="mt-1 text-2xl font-semibold tracking-tight sm:text-3xl">{copy.title}</h1>
      <p className="mt-1 text-sm text-ink-soft">
        Revision {copy.revisionNumber} · for {AUDIENCE_WORD[copy.audience]} · shared with {copy.reviewerName} until {formatInstant(copy.expiresAt)}
      </p>
      {copy.newerRevision !== null ? (
        <div className="mt-4">
          <Notice tone="caution" title="There is a newer revision">
            The team has changed this since the link was made: revision {copy.newerRevision} is the newest.{" "}
            <Link to="?revision=latest" className="font-medium underline underline-offset-4">
              Read revision {copy.newerRevision}
            </Link>
          </Notice>
        </div>
      ) : null}
      {latest && copy.revisionNumber !== copy.linkRevision ? (
        <div className="mt-4">
          <Notice title="You are reading the newest revision">
            The link was made for revision {copy.linkRevision}.{" "}
            <Link to="?" className="font-medium underline underline-offset-4">
              Read revision {copy.linkRevision}
            </Link>
          </Notice>
        </div>
      ) : null}
      <article className="mt-6">
        {copy.cover ? <Photo picture={copy.cover} caption={copy.cover.caption} /> : null}
        {copy.summary ? <p className="text-lg text-ink-soft">{copy.summary}</p> : null}
        {copy.intro ? <p className="whitespace-pre-line text-lg text-ink-soft">{copy.intro}</p> : null}
        {/* The server's own rendering of the revision's text: sanitised there, photos addressed under this link. */}
        {copy.html ? <div className={PROSE} dangerouslySetInnerHTML={{ __html: copy.html }} /> : null}
        {copy.kind === "story" ? <StoryItems items={copy.items} /> : null}
      </article>
      <AnswerForm key={`${latest}`} token={token} latest={latest} copy={copy} />
    </ReviewFrame>
  );
}

const REFUSALS: Record<string, string> = {
  review_link_not_found: "This review link cannot be used",
  review_link_expired: "This review link has expired",
  review_link_revoked: "This review link has been withdrawn",
  review_content_gone: "This draft is no longer available",
};

/** A link that is altered, expired, withdrawn or whose draft is gone: said plainly, never the draft. */
export function ReviewLinkError() {
  const error = useRouteError();
  const code = error instanceof ApiError ? error.code : "";
  return (
    <ReviewFrame title={REFUSALS[code] ?? "This review link cannot be opened"}>
      <h1 className="text-2xl font-semibold tracking-tight">{REFUSALS[code] ?? "This review link cannot be opened"}</h1>
      <div className="mt-4">
        <Notice tone="error">{error instanceof Error ? error.message : "Try again later, or ask the person who sent the link."}</Notice>
      </div>
    </ReviewFrame>
  );
}
