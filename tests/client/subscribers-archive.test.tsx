import { fireEvent, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { DigestArchiveCopy, DigestArchiveItem, DigestArchivePage } from "../../src/shared/schemas/digests.ts";
import type { PreferencesView } from "../../src/shared/schemas/subscribers.ts";
import { digestArchiveKeys, subscriptionKeys } from "../../src/features/subscribers/api.ts";
import { PreferencesPage } from "../../src/features/subscribers/routes.tsx";
import { renderWithApp } from "./render.tsx";

// Invented reader of the demo scenario (Aldermere Campus Phase 2); the shapes the routes send.
const TOKEN = "abcdefghij.0123456789012345678901234567890123456789012";
const project = { slug: "aldermere-phase-2", name: "Aldermere Campus Phase 2" };

const view: PreferencesView = {
  email: "reader@example.org",
  name: "Ada Fenwick",
  organisation: null,
  interest: "prospect",
  frequency: "weekly",
  topics: null,
  status: "unsubscribed",
  project,
  options: { areas: [], systems: [] },
};

const item = (id: number, over: Partial<DigestArchiveItem> = {}): DigestArchiveItem => ({
  id,
  project,
  frequency: "weekly",
  subject: `Aldermere Campus Phase 2: progress, week ${40 + id}`,
  sentAt: "2026-11-09T08:00:05.000Z",
  windowStart: "2026-11-02T00:00:00.000Z",
  windowEnd: "2026-11-09T00:00:00.000Z",
  firstDay: "2026-11-02",
  lastDay: "2026-11-08",
  webUrl: `https://progress.kestrel.example/api/digests/web/w${id}`,
  ...over,
});

function renderPage(list: DigestArchivePage, copies: Array<[number, DigestArchiveCopy]> = []) {
  return renderWithApp(<PreferencesPage />, {
    path: "/subscriptions/preferences/:token",
    route: `/subscriptions/preferences/${TOKEN}`,
    data: [[subscriptionKeys.link("preferences", TOKEN), view], [digestArchiveKeys.byLink(TOKEN, 1), list], ...copies.map(([id, c]) => [digestArchiveKeys.copyByLink(TOKEN, id), c] as [readonly unknown[], unknown])],
  });
}

describe("the preferences page: Your past digests", () => {
  it("lists the digests sent, newest first, with the days each covered; one opens in a frame that runs no script, with what was withheld said first", () => {
    const withheld: DigestArchiveCopy = {
      ...item(2),
      html: "<html><body><p>Second chiller on its plinth</p></body></html>",
      withheld: { count: 1, whole: false, notice: "One item in this digest is no longer available to you and has been withheld." },
    };
    renderPage({ items: [item(2), item(1, { firstDay: "2026-10-26", lastDay: "2026-11-01" })], total: 2, page: 1, pageSize: 20 }, [[2, withheld]]);
    expect(screen.getByRole("heading", { name: "Your past digests" })).toBeTruthy();
    const rows = within(screen.getByRole("list", { name: "Past digests, newest first" })).getAllByRole("listitem");
    expect(rows).toHaveLength(2);
    expect(rows[0]!.textContent).toContain("week 42");
    expect(rows[0]!.textContent).toContain("covers 2 Nov 2026 – 8 Nov 2026");
    expect(rows[1]!.textContent).toContain("covers 26 Oct 2026 – 1 Nov 2026");

    fireEvent.click(within(rows[0]!).getByRole("button", { name: "Read" }));
    expect(within(rows[0]!).getByRole("note").textContent).toContain("One item in this digest is no longer available to you and has been withheld.");
    const frame = within(rows[0]!).getByTitle(/^Digest sent 9 Nov 2026/);
    expect(frame.getAttribute("sandbox")).toBe("allow-same-origin");
    expect(frame.getAttribute("srcdoc")).toContain("Second chiller on its plinth");
    expect(within(rows[0]!).getByRole("button", { name: "Close" }).getAttribute("aria-expanded")).toBe("true");
  });

  it("a digest withheld whole shows the reason and no frame; an empty archive says nothing was sent yet", () => {
    const whole: DigestArchiveCopy = { ...item(3, { webUrl: null }), html: null, withheld: { count: 0, whole: true, notice: "This digest was sent before Plumbline kept a list of what each digest holds, so it cannot be checked against what you may see now, and it is withheld." } };
    const { unmount } = renderPage({ items: [item(3, { webUrl: null })], total: 1, page: 1, pageSize: 20 }, [[3, whole]]);
    const [row] = within(screen.getByRole("list", { name: "Past digests, newest first" })).getAllByRole("listitem");
    fireEvent.click(within(row!).getByRole("button", { name: "Read" }));
    expect(within(row!).getByRole("note").textContent).toMatch(/it is withheld/);
    expect(within(row!).queryByTitle(/^Digest sent/)).toBeNull();
    unmount();

    renderPage({ items: [], total: 0, page: 1, pageSize: 20 });
    expect(screen.getByText("No digest about Aldermere Campus Phase 2 has been sent to this address yet.")).toBeTruthy();
  });
});
