import { describe, expect, it } from "vitest";
import {
  editNeedsApproval,
  heldBackFields,
  outsideReviewEntry,
  publicationInstant,
  slugFromTitle,
  stepComment,
  stepFields,
  workflowStep,
} from "../../src/shared/domain/publishing-workflow.ts";
import type { Role } from "../../src/shared/schemas/common.ts";
import { PostStatusSchema, WORKFLOW_ACTIONS, type PostStatus, type WorkflowAction } from "../../src/shared/schemas/publishing.ts";

// The rules as the product states them (DESIGN.md "Posts and the publishing workflow", decision
// 010), written out as a table rather than derived from the code: every step that is open, from
// which state, to which state, and whether only the author's own work may take it without approval.
const OPEN: ReadonlyArray<{ action: WorkflowAction; from: PostStatus; to: PostStatus; ownWorkOnly?: true }> = [
  { action: "submit", from: "draft", to: "in_review" },
  { action: "submit", from: "withdrawn", to: "in_review" },
  { action: "approve", from: "in_review", to: "approved" },
  { action: "return", from: "in_review", to: "draft" },
  { action: "return", from: "approved", to: "draft" },
  { action: "return", from: "scheduled", to: "draft" },
  { action: "publish", from: "approved", to: "published" },
  { action: "publish", from: "withdrawn", to: "published" },
  { action: "publish", from: "scheduled", to: "published" },
  { action: "publish", from: "draft", to: "published", ownWorkOnly: true },
  { action: "publish", from: "in_review", to: "published", ownWorkOnly: true },
  { action: "schedule", from: "approved", to: "scheduled" },
  { action: "schedule", from: "draft", to: "scheduled", ownWorkOnly: true },
  { action: "schedule", from: "in_review", to: "scheduled", ownWorkOnly: true },
  { action: "withdraw", from: "published", to: "withdrawn" },
  { action: "withdraw", from: "scheduled", to: "approved" },
];

/** Who may take each step at all: marketing submits; leads and admins do everything. */
const MAY: Record<WorkflowAction, readonly Role[]> = {
  submit: ["admin", "lead", "marketing"],
  approve: ["admin", "lead"],
  return: ["admin", "lead"],
  publish: ["admin", "lead"],
  schedule: ["admin", "lead"],
  withdraw: ["admin", "lead"],
};

const ROLES: readonly Role[] = ["admin", "lead", "marketing", "investor"];

type Expected = { ok: true; to: PostStatus } | { ok: false; reason: "role" | "state" };

function expected(action: WorkflowAction, from: PostStatus, role: Role, ownWork: boolean): Expected {
  if (!MAY[action].includes(role)) return { ok: false, reason: "role" };
  const open = OPEN.find((o) => o.action === action && o.from === from && (!o.ownWorkOnly || ownWork));
  return open ? { ok: true, to: open.to } : { ok: false, reason: "state" };
}

const CASES = WORKFLOW_ACTIONS.flatMap((action) =>
  PostStatusSchema.options.flatMap((from) => ROLES.flatMap((role) => [false, true].map((ownWork) => [action, from, role, ownWork, expected(action, from, role, ownWork)] as const))),
);

describe("workflowStep: every step × state × role × own work", () => {
  it("covers every combination (6 steps × 6 states × 4 roles × own or not)", () => {
    expect(CASES).toHaveLength(6 * 6 * 4 * 2);
    // Open: submit 2 states × 3 roles × 2 = 12; approve 4; return 12; publish 12 + 4 (own draft or
    // in review); schedule 4 + 4 (own); withdraw 8.
    expect(CASES.filter(([, , , , e]) => e.ok)).toHaveLength(60);
  });

  it.each(CASES)("%s from %s by %s (own work: %s) → %j", (action, from, role, ownWork, want) => {
    const got = workflowStep(action, from, role, ownWork);
    if (want.ok) {
      expect(got).toEqual(want);
    } else {
      expect(got).toMatchObject({ ok: false, reason: want.reason });
      expect(got.ok === false && got.message.length).toBeGreaterThan(0);
    }
  });

  it("says why a step is refused, in words for people", () => {
    expect(workflowStep("publish", "draft", "lead", false)).toMatchObject({ reason: "state", message: expect.stringMatching(/approve it first/) });
    expect(workflowStep("approve", "published", "lead", false)).toMatchObject({ reason: "state", message: "It is published; only one in review can be approved." });
    expect(workflowStep("submit", "in_review", "marketing", true)).toMatchObject({ message: "It is in review; only a draft or a withdrawn one can be submitted." });
    expect(workflowStep("withdraw", "draft", "admin", true)).toMatchObject({ message: "It is a draft; only a published or scheduled one can be withdrawn." });
    expect(workflowStep("approve", "in_review", "marketing", false)).toMatchObject({ reason: "role", message: "Only a lead or an admin approves." });
    expect(workflowStep("submit", "draft", "investor", false)).toMatchObject({ reason: "role", message: "Only staff submit for review." });
  });
});

describe("what a step writes besides the status", () => {
  const at = new Date("2030-05-01T10:00:00Z");
  const when = new Date("2030-06-01T08:00:00Z");
  it.each([
    ["schedule", "approved", { scheduledFor: when, reviewComment: null }],
    ["return", "scheduled", { reviewComment: "Name the hall.", scheduledFor: null }],
    ["approve", "in_review", { reviewComment: null }],
    ["withdraw", "scheduled", { scheduledFor: null }],
    ["withdraw", "published", { withdrawnAt: at }],
    ["submit", "draft", {}],
  ] as const)("%s from %s → %j", (action, from, fields) => {
    expect(stepFields(action, from, { at, when, comment: "Name the hall." })).toEqual(fields);
  });

  it("leaves a return's reasons and a schedule's time in the history, nothing for other steps", () => {
    expect(stepComment("return", { comment: "Name the hall." })).toBe("Name the hall.");
    expect(stepComment("schedule", { when })).toBe("for 2030-06-01T08:00:00.000Z");
    expect(stepComment("approve", { comment: "ignored" })).toBeNull();
  });
});

describe("edits after approval, and the scheduler", () => {
  it.each([
    ["approved", "marketing", true],
    ["scheduled", "marketing", true],
    ["draft", "marketing", false],
    ["in_review", "marketing", false],
    ["approved", "lead", false],
    ["scheduled", "admin", false],
  ] as const)("an edit of %s work by %s needs approval again: %s", (status, role, needs) => {
    expect(editNeedsApproval(status, role)).toBe(needs);
  });

  it("holds back a due item with every problem as the reason, its schedule cancelled", () => {
    const problems = [
      { code: "no_cover", message: "Choose a cover photo." },
      { code: "missing_alt_text", message: "The cover (photo #4) has no alt text." },
    ] as const;
    expect(heldBackFields([...problems])).toEqual({
      status: "approved",
      scheduledFor: null,
      reviewComment: "Not published at the scheduled time: Choose a cover photo. The cover (photo #4) has no alt text.",
    });
  });

  it("counts a scheduled item as published at its time, or at the pass's time when that is earlier", () => {
    const at = new Date("2031-01-05T10:05:00Z");
    expect(publicationInstant(new Date("2031-01-05T10:00:00Z"), at)).toEqual(new Date("2031-01-05T10:00:00Z"));
    expect(publicationInstant(new Date("2031-01-05T10:10:00Z"), at)).toEqual(at);
    expect(publicationInstant(null, at)).toEqual(at);
  });

  it.each([
    ["Chillers on their plinths", "chillers-on-their-plinths"],
    ["Hall 2A: fit-out — week 12", "hall-2a-fit-out-week-12"],
    ["Générateurs livrés", "generateurs-livres"],
    ["!!!", "update"],
  ])("makes the address %j → %j", (title, slug) => {
    expect(slugFromTitle(title)).toBe(slug);
  });
});

describe("outsideReviewEntry: a reviewer's answer through a review link as a history entry (decision 060)", () => {
  // Our own rule (no published source): the verdict is in the code and leads the comment, the
  // reviewer is named as not one of the team, and the name fits the history's 200 characters.
  it.each([
    [
      "looks right, with an organisation and a comment",
      { reviewerName: "Rowan Pike", organisation: "Harbour Communications", verdict: "looks_right", comment: "Reads well.", revisionNumber: 3 },
      { action: "outside_review_looks_right", actorName: "Rowan Pike (outside reviewer, Harbour Communications)", comment: "Looks right (revision 3) — Reads well." },
    ],
    [
      "needs changes, no organisation, no comment",
      { reviewerName: "Sam Vale", organisation: null, verdict: "needs_changes", comment: null, revisionNumber: 1 },
      { action: "outside_review_needs_changes", actorName: "Sam Vale (outside reviewer)", comment: "Needs changes (revision 1)" },
    ],
    [
      "a blank organisation reads as none; markup in the comment is kept as the reviewer wrote it",
      { reviewerName: "Sam Vale", organisation: "  ", verdict: "needs_changes", comment: "<b>Not yet</b> piped.", revisionNumber: 2 },
      { action: "outside_review_needs_changes", actorName: "Sam Vale (outside reviewer)", comment: "Needs changes (revision 2) — <b>Not yet</b> piped." },
    ],
  ] as const)("%s", (_case, review, entry) => {
    expect(outsideReviewEntry(review)).toEqual(entry);
  });

  it("keeps a 200-character name and a 200-character organisation within the history's 200 characters, both still readable", () => {
    const entry = outsideReviewEntry({ reviewerName: "N".repeat(200), organisation: "O".repeat(200), verdict: "looks_right", comment: null, revisionNumber: 1 });
    expect(entry.actorName.length).toBeLessThanOrEqual(200);
    expect(entry.actorName).toMatch(/^N+… \(outside reviewer, O{79}…\)$/);
  });
});
