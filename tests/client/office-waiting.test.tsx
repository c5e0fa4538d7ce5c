import { cleanup, screen, within } from "@testing-library/react";
import { afterEach, describe, expect, it } from "vitest";
import type { OfficeWaiting } from "../../src/shared/schemas/office.ts";
import { WaitingPanel } from "../../src/features/office/waiting-panel.tsx";
import { renderWithApp } from "./render.tsx";

afterEach(cleanup);

const KEY = ["office", "waiting"] as const;
const ALDERMERE = { slug: "aldermere-phase-2", name: "Aldermere Campus, Phase 2", timeZone: "Europe/London" };

const linkOf = (name: RegExp) => screen.getByRole("link", { name });

describe("Waiting for you", () => {
  it("lists each count as a link to the page where that work is done", () => {
    const waiting: OfficeWaiting = {
      items: [
        { kind: "updates_to_review", project: ALDERMERE, count: 2, nextAt: null },
        { kind: "photos_to_clear", project: ALDERMERE, count: 1, nextAt: null },
        { kind: "new_enquiries", project: ALDERMERE, count: 3, nextAt: null },
        { kind: "digests_due", project: ALDERMERE, count: 1, nextAt: "2026-12-07T08:00:00.000Z" },
        { kind: "decisions_overdue", project: ALDERMERE, count: 1, nextAt: null },
        { kind: "units_awaiting_commissioning", project: ALDERMERE, count: 4, nextAt: null },
      ],
    };
    renderWithApp(<WaitingPanel />, { data: [[KEY, waiting]] });
    expect(screen.getByRole("heading", { name: "Waiting for you" })).toBeTruthy();
    expect(linkOf(/^2 updates to review/).getAttribute("href")).toBe("/office/updates?project=aldermere-phase-2&status=in_review");
    // One of a kind reads in the singular.
    expect(linkOf(/^1 photo to clear/).getAttribute("href")).toBe("/office/media/review?project=aldermere-phase-2");
    expect(linkOf(/^3 new enquiries/).getAttribute("href")).toBe("/office/enquiries?status=new");
    const digest = linkOf(/^1 digest to send in the next 7 days/);
    expect(digest.getAttribute("href")).toBe("/office/digests");
    // When it is sent, in the project's zone and en-GB words.
    expect(within(digest).getByText(/first on 7 Dec 2026, 08:00 GMT/)).toBeTruthy();
    expect(linkOf(/^1 decision overdue/).getAttribute("href")).toBe("/office/decisions?project=aldermere-phase-2");
    expect(linkOf(/^4 units installed, awaiting commissioning/).getAttribute("href")).toBe("/office/facility?project=aldermere-phase-2");
    expect(screen.queryByText(/Nothing waiting/)).toBeNull();
    // One project: its name is not repeated on every row.
    expect(screen.queryByText(ALDERMERE.name)).toBeNull();
  });

  it("names the project on each row when there are several", () => {
    const other = { slug: "second-build", name: "Second build", timeZone: "Europe/London" };
    renderWithApp(<WaitingPanel />, {
      data: [[KEY, { items: [{ kind: "photos_to_clear", project: ALDERMERE, count: 2, nextAt: null }, { kind: "photos_to_clear", project: other, count: 5, nextAt: null }] } satisfies OfficeWaiting]],
    });
    expect(within(linkOf(/^5 photos to clear/)).getByText("Second build")).toBeTruthy();
    expect(linkOf(/^5 photos to clear/).getAttribute("href")).toBe("/office/media/review?project=second-build");
    expect(within(linkOf(/^2 photos to clear/)).getByText(ALDERMERE.name)).toBeTruthy();
  });

  it("says so when nothing is waiting, with no links", () => {
    renderWithApp(<WaitingPanel />, { data: [[KEY, { items: [] } satisfies OfficeWaiting]] });
    expect(screen.getByText("Nothing waiting for you.")).toBeTruthy();
    expect(screen.queryAllByRole("link")).toHaveLength(0);
  });
});
