import { cleanup, render } from "@testing-library/react";
import { afterEach, describe, expect, it } from "vitest";
import { PublishingHistory, type PublishingStep } from "../../src/components/ui/publishing-history.tsx";

afterEach(cleanup);

/** Rows as GET /api/posts/:id/history answers them, newest first (an outside reviewer's answer: decision 060). */
const steps: PublishingStep[] = [
  {
    action: "outside_review_needs_changes",
    from: "in_review",
    to: "in_review",
    by: "Rowan Pike (outside reviewer, Harbour Communications)",
    comment: "Needs changes (revision 2) — Hall 2 is <b>not</b> ready.\nCheck the date.",
    at: "2026-11-20T10:15:00.000Z",
  },
  { action: "outside_review_looks_right", from: "in_review", to: "in_review", by: "Sam Vale (outside reviewer)", comment: "Looks right (revision 1)", at: "2026-11-19T09:00:00.000Z" },
  { action: "submit", from: "draft", to: "in_review", by: "Morgan Hale", comment: null, at: "2026-11-18T16:30:00.000Z" },
];

describe("PublishingHistory: an outside reviewer's answer", () => {
  it("reads as an outside review with the verdict's shape and words, the state it met, the reviewer and the comment as text", () => {
    const { getByTestId } = render(<PublishingHistory steps={steps} zone="Europe/London" />);
    const list = getByTestId("publishing-history");
    const [needs, looks, submit] = Array.from(list.querySelectorAll("li"));

    expect(needs!.dataset.action).toBe("outside_review_needs_changes");
    // Our own rule (DEVELOPERS.md "Words, shapes and colour on screen"): ▲ needs attention, ✓ a person's yes, each beside words.
    expect(needs!.querySelector("p")!.textContent).toBe("▲ Outside review · In review");
    expect(needs!.querySelector('[aria-hidden="true"]')!.textContent).toBe("▲ ");
    expect(needs!.textContent).toContain("20 Nov 2026");
    expect(needs!.textContent).toContain("Rowan Pike (outside reviewer, Harbour Communications)");
    const comment = needs!.querySelectorAll("p")[2]!;
    expect(comment.textContent).toBe("Needs changes (revision 2) — Hall 2 is <b>not</b> ready.\nCheck the date.");
    // The reviewer's markup is shown as they typed it, never made into elements.
    expect(comment.querySelector("b")).toBeNull();

    expect(looks!.querySelector("p")!.textContent).toBe("✓ Outside review · In review");
    expect(looks!.textContent).toContain("Sam Vale (outside reviewer)");
    expect(looks!.textContent).toContain("Looks right (revision 1)");

    // A step that moves the work still names both states.
    expect(submit!.querySelector("p")!.textContent).toBe("Submitted for review · Draft → In review");
  });
});
