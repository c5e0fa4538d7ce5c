/**
 * The rules that updates (posts) and photo stories share as they go through the publishing
 * workflow: which step is open to whom from which state (`workflowStep`: the server enforces it,
 * the browser offers the same steps), their addresses, what each step changes, when an edit needs
 * approval again, and what the scheduler does with an item that is due. No clock: `at` is passed in.
 */
import type { Role } from "../schemas/common.ts";
import { OUTSIDE_REVIEW_ACTIONS, type OutsideReviewAction, type PostStatus, type PublishingProblem, type WorkflowAction } from "../schemas/publishing.ts";

/** The kinds of published content, as history rows and photo usages name their owner. */
export type ContentKind = "post" | "story";

/** Words for people (the codes stay in JSON). */
export const STATUS_WORDS: Record<PostStatus, string> = {
  draft: "a draft",
  in_review: "in review",
  approved: "approved",
  scheduled: "scheduled",
  published: "published",
  withdrawn: "withdrawn",
};

/** Why a step is refused: the caller's role ("role", answered 403) or the item's state ("state", 409). */
export type StepRefusal = { ok: false; reason: "role" | "state"; message: string };

/**
 * What the workflow allows. `by` is the caller's role; `ownWork` whether the caller wrote it.
 * Answers the next status, or a reason the step is not open.
 *
 * draft → in_review (submit: marketing, lead, admin) → approved (approve: lead, admin)
 * → published (publish) or scheduled (schedule: lead, admin) → withdrawn (withdraw: lead, admin).
 * Return sends in_review, approved or scheduled back to draft with comments (lead, admin).
 * A lead or admin may publish or schedule their own draft or in-review work without approval.
 * Withdrawn work may be submitted again, or published again by a lead or admin.
 * Withdrawing scheduled work cancels the schedule (back to approved).
 */
export function workflowStep(action: WorkflowAction, from: PostStatus, by: Role, ownWork: boolean): { ok: true; to: PostStatus } | StepRefusal {
  const approver = by === "lead" || by === "admin";
  const staff = approver || by === "marketing";
  const role = (message: string): StepRefusal => ({ ok: false, reason: "role", message });
  const state = (message: string): StepRefusal => ({ ok: false, reason: "state", message });
  switch (action) {
    case "submit":
      if (!staff) return role("Only staff submit for review.");
      if (from === "draft" || from === "withdrawn") return { ok: true, to: "in_review" };
      return state(`It is ${STATUS_WORDS[from]}; only a draft or a withdrawn one can be submitted.`);
    case "approve":
      if (!approver) return role("Only a lead or an admin approves.");
      if (from === "in_review") return { ok: true, to: "approved" };
      return state(`It is ${STATUS_WORDS[from]}; only one in review can be approved.`);
    case "return":
      if (!approver) return role("Only a lead or an admin returns work with comments.");
      if (from === "in_review" || from === "approved" || from === "scheduled") return { ok: true, to: "draft" };
      return state(`It is ${STATUS_WORDS[from]}; only one in review, approved or scheduled can be returned.`);
    case "publish":
    case "schedule": {
      if (!approver) return role("Only a lead or an admin publishes.");
      const to: PostStatus = action === "publish" ? "published" : "scheduled";
      if (from === "approved" || (action === "publish" && (from === "withdrawn" || from === "scheduled"))) return { ok: true, to };
      if ((from === "draft" || from === "in_review") && ownWork) return { ok: true, to };
      if (from === "draft" || from === "in_review") return state("It has not been approved yet; approve it first (a lead may publish only their own work without approval).");
      return state(`It is ${STATUS_WORDS[from]} already.`);
    }
    case "withdraw":
      if (!approver) return role("Only a lead or an admin withdraws.");
      if (from === "published") return { ok: true, to: "withdrawn" };
      if (from === "scheduled") return { ok: true, to: "approved" };
      return state(`It is ${STATUS_WORDS[from]}; only a published or scheduled one can be withdrawn.`);
  }
}

/** An address made from a title: lower-case ASCII words joined by hyphens (at most 80 characters). */
export function slugFromTitle(title: string): string {
  const slug = title
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 80)
    .replace(/-+$/g, "");
  return slug || "update";
}

/** The workflow fields a step other than publishing writes besides the status. */
export interface StepFields {
  scheduledFor?: Date | null;
  reviewComment?: string | null;
  withdrawnAt?: Date;
}

/**
 * What a step (other than publishing, which writes the whole publication) changes besides the
 * status: scheduling sets the time and clears the review comment; returning keeps the comment
 * and cancels any schedule; approving clears the comment; withdrawing a scheduled item cancels
 * its schedule, a published one records when it was withdrawn (`at`). `when` is the validated
 * publication time of a schedule step.
 */
export function stepFields(action: Exclude<WorkflowAction, "publish">, from: PostStatus, p: { at: Date; when?: Date; comment?: string }): StepFields {
  switch (action) {
    case "schedule":
      return { scheduledFor: p.when ?? null, reviewComment: null };
    case "return":
      return { reviewComment: p.comment ?? null, scheduledFor: null };
    case "approve":
      return { reviewComment: null };
    case "withdraw":
      if (from === "scheduled") return { scheduledFor: null };
      if (from === "published") return { withdrawnAt: p.at };
      return {};
    case "submit":
      return {};
  }
}

/** The comment a step leaves in the history: a return's reasons, or when a schedule publishes. */
export function stepComment(action: WorkflowAction, p: { when?: Date; comment?: string }): string | null {
  if (action === "return") return p.comment ?? null;
  if (action === "schedule" && p.when) return `for ${p.when.toISOString()}`;
  return null;
}

/** An approval was given to the work as it stood: marketing's later edit of approved or scheduled work needs a new one. */
export function editNeedsApproval(status: PostStatus, role: Role): boolean {
  const approver = role === "lead" || role === "admin";
  return !approver && (status === "approved" || status === "scheduled");
}

/** The history comment of an edit that sent approved or scheduled work back to draft. */
export const EDITED_AFTER_APPROVAL = "Edited after approval: needs approval again.";

/** Why the scheduler did not publish a due item: every problem, in order. */
export function heldBackReason(problems: readonly PublishingProblem[]): string {
  return `Not published at the scheduled time: ${problems.map((p) => p.message).join(" ")}`;
}

/** A due item the checks now refuse goes back to approved, its schedule cancelled and the reason kept. */
export function heldBackFields(problems: readonly PublishingProblem[]): { status: "approved"; scheduledFor: null; reviewComment: string } {
  return { status: "approved", scheduledFor: null, reviewComment: heldBackReason(problems) };
}

/** A scheduled item counts as published at its scheduled time, or at `at` if that is earlier. */
export function publicationInstant(scheduledFor: Date | null, at: Date): Date {
  return scheduledFor && scheduledFor < at ? scheduledFor : at;
}

/** An outside reviewer's answer through a review link, as the review-links module passes it on. */
export interface OutsideReview {
  reviewerName: string;
  organisation: string | null;
  verdict: keyof typeof OUTSIDE_REVIEW_ACTIONS;
  /** The reviewer's comment, trimmed; null when they left none. */
  comment: string | null;
  /** The revision the reviewer read: a link may show a newer one than it was made for. */
  revisionNumber: number;
}

const OUTSIDE_VERDICT_WORDS: Record<OutsideReview["verdict"], string> = { looks_right: "Looks right", needs_changes: "Needs changes" };

/** The history column `actor_name` holds 200 characters; a reviewer's name and organisation may each be 200. */
const ACTOR_NAME_MAX = 200;
const clip = (s: string, n: number) => (s.length <= n ? s : `${s.slice(0, n - 1)}…`);

/**
 * The history entry of an outside reviewer's answer: one action code per verdict, the reviewer
 * named as not one of the team, and the comment led by the verdict in words and the revision read
 * (so the entry reads whole wherever the code is not known).
 */
export function outsideReviewEntry(r: OutsideReview): { action: OutsideReviewAction; actorName: string; comment: string } {
  const org = r.organisation?.trim() || null;
  const suffix = org ? ` (outside reviewer, ${clip(org, 80)})` : " (outside reviewer)";
  const actorName = `${clip(r.reviewerName.trim(), ACTOR_NAME_MAX - suffix.length)}${suffix}`;
  const head = `${OUTSIDE_VERDICT_WORDS[r.verdict]} (revision ${r.revisionNumber})`;
  return { action: OUTSIDE_REVIEW_ACTIONS[r.verdict], actorName, comment: r.comment ? `${head} — ${r.comment}` : head };
}
