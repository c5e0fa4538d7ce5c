import { cleanup, fireEvent, screen, waitFor } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { ReviewCopy, ReviewLink } from "../../src/shared/schemas/review-links.ts";
import { reviewKeys } from "../../src/features/review-links/api.ts";
import { ReviewPage } from "../../src/features/review-links/routes.tsx";
import { ReviewLinksSheet } from "../../src/lib/review-links-panel.tsx";
import { reviewLinkKeys } from "../../src/lib/review-links.ts";
import { jsonAnswer, stubFetch } from "./fetch-stub.ts";
import { renderWithApp } from "./render.tsx";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const URL_ONCE = "https://plumbline.example/review/eyJsIjo3LCJuIjoiQUFBQSJ9.AbCdEfGhIjKlMnOpQrStUvWxYz0123456789_-abcde";

const LINK: ReviewLink = {
  id: 7,
  contentKind: "post",
  contentId: 41,
  revisionNumber: 2,
  reviewer: { name: "Rowan Pike", email: "rowan.pike@example.test", organisation: "Harbour Communications" },
  createdBy: { id: 3, name: "Mara Quill" },
  createdAt: "2026-11-30T09:00:00.000Z",
  expiresAt: "2026-12-07T09:00:00.000Z",
  revokedAt: null,
  state: "live",
  events: [
    { kind: "answered", verdict: "needs_changes", comment: "Say “set on its plinth”.", revisionNumber: 2, ip: "192.0.2.4", at: "2026-12-01T10:00:00.000Z" },
    { kind: "opened", verdict: null, comment: null, revisionNumber: 2, ip: "192.0.2.4", at: "2026-12-01T09:58:00.000Z" },
  ],
};

/** The API as the panel and the page meet it; each call is kept with its method, address and body. */
function stubApi(answers: Record<string, { status: number; body?: unknown }>) {
  const calls: Array<{ method: string; url: string; body: unknown }> = [];
  stubFetch(({ method, url, init }) => {
    calls.push({ method, url, body: init.body ? JSON.parse(String(init.body)) : null });
    const answer = answers[`${method} ${url}`];
    if (!answer) return jsonAnswer(404, { error: { code: "not_found", message: "no such route in the test" } });
    return answer.body === undefined ? new Response(null, { status: answer.status }) : jsonAnswer(answer.status, answer.body);
  });
  return calls;
}

describe("the editor's Review links panel", () => {
  it("makes a link, shows its URL once, lists openings and answers in words and shapes, and refuses 31 days before sending", async () => {
    const calls = stubApi({
      "GET /api/posts/41/review-links": { status: 200, body: { links: [LINK] } },
      "POST /api/posts/41/review-links": { status: 201, body: { id: 8, url: URL_ONCE } },
    });
    renderWithApp(<ReviewLinksSheet kind="post" id={41} status="draft" zone="Europe/London" historyKey={["posts", "post", 41, "history"]} />);
    const answers = await screen.findByRole("list", { name: "Answers from Rowan Pike" });
    expect(answers.textContent).toContain("▲ Needs changes");
    expect(answers.textContent).toContain("Say “set on its plinth”.");
    expect(screen.getByText(/Opened 1 time/).textContent).toContain("made by Mara Quill");
    expect(screen.getByText(/● Open · revision 2/)).toBeTruthy();
    expect(screen.queryByLabelText(/The review link/)).toBeNull();

    fireEvent.change(screen.getByLabelText("Reviewer's name"), { target: { value: "Sam Vale" } });
    fireEvent.change(screen.getByLabelText("Reviewer's e-mail"), { target: { value: "sam.vale@example.test" } });
    fireEvent.change(screen.getByLabelText("Days it stays open"), { target: { value: "31" } });
    fireEvent.click(screen.getByRole("button", { name: "Make the link" }));
    expect(await screen.findByText("must be at most 30 days")).toBeTruthy();
    expect(calls.filter((c) => c.method === "POST")).toHaveLength(0);

    fireEvent.change(screen.getByLabelText("Days it stays open"), { target: { value: "3" } });
    fireEvent.click(screen.getByRole("button", { name: "Make the link" }));
    const shown = (await screen.findByLabelText("The review link (shown only now)")) as HTMLInputElement;
    expect(shown.value).toBe(URL_ONCE);
    expect(shown.readOnly).toBe(true);
    expect(calls.find((c) => c.method === "POST")?.body).toEqual({ name: "Sam Vale", email: "sam.vale@example.test", days: 3 });
  });

  it("a new answer in the list makes the item's history stale too (the answer is one of its entries)", async () => {
    const historyKey = ["posts", "post", 41, "history"] as const;
    let links = [LINK];
    stubFetch(({ method, url }) => (method === "GET" && url === "/api/posts/41/review-links" ? jsonAnswer(200, { links }) : jsonAnswer(404, { error: { code: "not_found", message: "no" } })));
    const { client } = renderWithApp(<ReviewLinksSheet kind="post" id={41} status="draft" zone="Europe/London" historyKey={historyKey} />, { data: [[historyKey, []]] });
    await screen.findByRole("list", { name: "Answers from Rowan Pike" });
    expect(client.getQueryState(historyKey)?.isInvalidated).toBe(false);
    // Fetched again with nothing new: the history is left alone.
    await client.refetchQueries({ queryKey: reviewLinkKeys.of("post", 41) });
    expect(client.getQueryState(historyKey)?.isInvalidated).toBe(false);
    links = [{ ...LINK, events: [{ kind: "answered", verdict: "looks_right", comment: null, revisionNumber: 2, ip: "192.0.2.9", at: "2026-12-02T08:00:00.000Z" }, ...LINK.events] }];
    await client.refetchQueries({ queryKey: reviewLinkKeys.of("post", 41) });
    await waitFor(() => expect(client.getQueryState(historyKey)?.isInvalidated).toBe(true));
  });

  it("offers no form for approved work, but still lists the links made before", async () => {
    stubApi({ "GET /api/stories/5/review-links": { status: 200, body: { links: [{ ...LINK, contentKind: "story", contentId: 5, state: "revoked", revokedAt: "2026-12-02T10:00:00.000Z", events: [] }] } } });
    renderWithApp(<ReviewLinksSheet kind="story" id={5} status="approved" zone="Europe/London" historyKey={["stories", "story", 5, "history"]} />);
    expect(await screen.findByText(/✕ Withdrawn/)).toBeTruthy();
    expect(screen.queryByRole("button", { name: "Make the link" })).toBeNull();
    expect(screen.queryByRole("button", { name: "Withdraw this link" })).toBeNull();
    expect(screen.getByText("Links are made for drafts and work in review. Earlier links are listed below.")).toBeTruthy();
  });
});

const COPY: ReviewCopy = {
  kind: "post",
  projectName: "Aldermere Campus Phase 2",
  reviewerName: "Rowan Pike",
  expiresAt: "2026-12-07T09:00:00.000Z",
  revisionNumber: 2,
  linkRevision: 2,
  newerRevision: 3,
  title: "Chillers set on their plinths",
  audience: "public",
  summary: "All five chillers are on their plinths.",
  html: "<p>The five chillers arrived this month.</p>",
  cover: null,
  intro: null,
  items: [],
  answers: [],
};

describe("the reviewer's page /review/:token", () => {
  it("marks the draft, offers the newer revision, and sends the answer on the revision read", async () => {
    const token = "abc.def";
    const calls = stubApi({
      [`POST /api/review/${token}/answer`]: { status: 201, body: { answers: [{ verdict: "needs_changes", comment: "Not piped yet.", revisionNumber: 2, at: "2026-12-01T10:00:00.000Z" }] } },
    });
    renderWithApp(<ReviewPage />, { path: "/review/:token", route: `/review/${token}`, data: [[reviewKeys.copy(token, false), COPY]] });
    expect(screen.getByTestId("draft-banner").textContent).toContain("Draft — not for publication");
    expect(document.querySelector('meta[name="robots"][content="noindex"]')).not.toBeNull();
    expect(screen.getByRole("heading", { name: "Chillers set on their plinths" })).toBeTruthy();
    expect(screen.getByRole("link", { name: "Read revision 3" }).getAttribute("href")).toBe(`/review/${token}?revision=latest`);

    fireEvent.click(screen.getByRole("button", { name: "Send my answer" }));
    expect(await screen.findByText("✕ Choose “Looks right” or “Needs changes”.")).toBeTruthy();
    expect(calls).toHaveLength(0);

    fireEvent.click(screen.getByLabelText("Needs changes"));
    fireEvent.change(screen.getByLabelText("Comment (optional)"), { target: { value: "Not piped yet." } });
    fireEvent.click(screen.getByRole("button", { name: "Send my answer" }));
    await screen.findByText("✓ Thank you: your answer reached the team.");
    expect(calls).toEqual([{ method: "POST", url: `/api/review/${token}/answer`, body: { verdict: "needs_changes", comment: "Not piped yet." } }]);
    await waitFor(() => expect(screen.getByText("Your answers so far")).toBeTruthy());
    expect(screen.getByText("Not piped yet.")).toBeTruthy();
  });
});
