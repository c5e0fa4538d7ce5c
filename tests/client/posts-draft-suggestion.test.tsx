import { fireEvent, screen, within } from "@testing-library/react";
import { describe, expect, it, vi } from "vitest";
import type { DraftSuggestion } from "../../src/shared/schemas/writing-help.ts";
import { postKeys } from "../../src/features/posts/api.ts";
import { DraftSuggestionPanel } from "../../src/features/posts/components/draft-suggestion-panel.tsx";
import { renderWithApp } from "./render.tsx";

const SLUG = "aldermere-phase-2";
const suggestion: DraftSuggestion = {
  audience: "public",
  since: "2026-11-01T09:00:00.000Z",
  until: "2026-11-29T09:00:00.000Z",
  title: "Hall 2A chillers: 2 units commissioned, HD-1 energised forecast 12 days later",
  groups: [
    { heading: "Plant commissioned", moves: [{ kind: "unit_commissioned", title: "Hall 2A chillers", detail: "2 units commissioned (CH-1, CH-2)", at: "2026-11-29", milestoneId: null, days: null }] },
    { heading: "Forecasts moved", moves: [{ kind: "forecast_moved", title: "HD-1 energised", detail: "forecast moved 12 days later, to 2027-01-15", at: "2026-11-29", milestoneId: 11, days: 12 }] },
  ],
  milestoneIds: [11],
  photos: [{ mediaId: 5, caption: "Chillers lifted onto the roof", altCandidate: "Chillers lifted onto the roof", takenAt: "2026-11-10T10:00:00", because: ["Hall 2A"], thumbUrl: "/media/v/a.jpg" }],
};

describe("DraftSuggestionPanel", () => {
  it("shows the suggested title, a heading per group of moves and the photos with why they were picked", () => {
    renderWithApp(<DraftSuggestionPanel slug={SLUG} onStartBlank={() => undefined} />, { data: [[postKeys.suggestion(SLUG, "public"), { suggestion }]] });
    const panel = screen.getByTestId("draft-suggestion");
    expect(within(panel).getByTestId("suggested-title").textContent).toBe(suggestion.title);
    expect(within(panel).getAllByRole("heading").map((h) => h.textContent)).toEqual(["Plant commissioned", "Forecasts moved", "Photographs, best first"]);
    expect(within(panel).getByRole("img", { name: "Chillers lifted onto the roof" })).not.toBeNull();
    expect(panel.textContent).toContain("Shows Hall 2A");
    expect(within(panel).getByRole("button", { name: "Start from this" })).not.toBeNull();
  });

  it("with nothing to suggest says so and offers only to start blank, which calls back", () => {
    const onStartBlank = vi.fn();
    renderWithApp(<DraftSuggestionPanel slug={SLUG} onStartBlank={onStartBlank} />, { data: [[postKeys.suggestion(SLUG, "public"), { suggestion: null }]] });
    expect(screen.getByText("Nothing has happened since the last published update for this audience.")).not.toBeNull();
    expect(screen.queryByRole("button", { name: "Start from this" })).toBeNull();
    fireEvent.click(screen.getByRole("button", { name: "Start blank" }));
    expect(onStartBlank).toHaveBeenCalledOnce();
  });

  it("asks again for the audience chosen", () => {
    renderWithApp(<DraftSuggestionPanel slug={SLUG} onStartBlank={() => undefined} />, {
      data: [
        [postKeys.suggestion(SLUG, "public"), { suggestion: null }],
        [postKeys.suggestion(SLUG, "investor"), { suggestion: { ...suggestion, audience: "investor", title: "For investors" } }],
      ],
    });
    fireEvent.change(screen.getByLabelText("Update for"), { target: { value: "investor" } });
    expect(screen.getByTestId("suggested-title").textContent).toBe("For investors");
  });
});
