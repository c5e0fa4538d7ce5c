import { fireEvent, screen, within } from "@testing-library/react";
import { describe, expect, it, vi } from "vitest";
import type { MediaPicture } from "../../src/shared/schemas/media.ts";
import type { ThenAndNowPair } from "../../src/shared/schemas/writing-help.ts";
import { storyKeys } from "../../src/features/stories/api.ts";
import { ThenAndNowPanel } from "../../src/features/stories/components/then-and-now-panel.tsx";
import { mediaKeys } from "../../src/features/media/api.ts";
import { ThenAndNowList } from "../../src/features/media/components/then-and-now-list.tsx";
import { renderWithApp } from "./render.tsx";

const SLUG = "aldermere-phase-2";
const picture = (id: number, alt: string, takenAt: string): MediaPicture => ({
  id, width: 1600, height: 1067, altText: alt, caption: null, credit: null, placeholder: null, dominantColor: "#8899aa", takenAt, focal: { x: 0.5, y: 0.5 }, isIllustration: true,
  sources: { avif: [], webp: [], jpeg: [{ url: `/media/v/${id}-320w.jpg`, width: 320, height: 213, format: "jpeg" }] },
});
const side = (id: number, alt: string, takenAt: string) => ({ mediaId: id, takenAt, caption: alt, thumbUrl: `/media/v/${id}-320w.jpg`, picture: picture(id, alt, takenAt) });
const hall: ThenAndNowPair = { area: "Hall 2A", then: side(2, "Hall 2A steel frame", "2026-03-02T10:15:00"), now: side(3, "Hall 2A cladding", "2026-05-04T11:32:00"), daysApart: 63, distance: 8 };
const yard: ThenAndNowPair = { area: "Plant yard", then: side(1, "Plant yard slab", "2026-01-05T09:00:00"), now: side(7, "Chiller row", "2026-06-01T09:00:00"), daysApart: 147, distance: 2 };

describe("the story editor's then-and-now panel", () => {
  it("shows each pair side by side with both capture dates, days apart and likeness, and adds one with one click", () => {
    const onAdd = vi.fn();
    renderWithApp(<ThenAndNowPanel slug={SLUG} audience="public" inStory={new Set()} onAdd={onAdd} />, { data: [[storyKeys.pairs(SLUG, { audience: "public", limit: 12 }), { pairs: [yard, hall] }]] });
    const offers = screen.getAllByTestId("then-and-now-pair");
    expect(offers).toHaveLength(2);
    const second = offers[1]!;
    expect(second.textContent).toContain("Hall 2A · 63 days apart · the same framing");
    expect(within(second).getByRole("img", { name: "Hall 2A steel frame" })).not.toBeNull();
    expect(within(second).getByRole("img", { name: "Hall 2A cladding" })).not.toBeNull();
    expect(within(second).getAllByText(/Taken \d+ \w+ 2026/)).toHaveLength(2);
    expect(offers[0]!.textContent).toContain("almost the same framing");
    fireEvent.click(within(second).getByRole("button", { name: "Add this pair" }));
    expect(onAdd).toHaveBeenCalledWith(hall);
  });

  it("leaves out pairs the story already holds, and says when none is left", () => {
    renderWithApp(<ThenAndNowPanel slug={SLUG} audience="investor" inStory={new Set(["2-3"])} onAdd={() => undefined} />, { data: [[storyKeys.pairs(SLUG, { audience: "investor", limit: 12 }), { pairs: [hall] }]] });
    expect(screen.queryAllByTestId("then-and-now-pair")).toHaveLength(0);
    expect(screen.getByText("No pair found for this audience yet.")).not.toBeNull();
    expect(screen.getByText(/cleared for investors/)).not.toBeNull();
  });
});

describe("the media library's then-and-now list", () => {
  it("lists the pairs for a public story, and those of another audience when chosen", () => {
    renderWithApp(<ThenAndNowList slug={SLUG} />, {
      data: [
        [mediaKeys.pairs(SLUG, { audience: "public", limit: 24 }), { pairs: [hall] }],
        [mediaKeys.pairs(SLUG, { audience: "internal", limit: 24 }), { pairs: [hall, yard] }],
      ],
    });
    expect(screen.getAllByTestId("then-and-now-pair")).toHaveLength(1);
    expect(screen.queryByRole("button", { name: "Add this pair" })).toBeNull();
    fireEvent.change(screen.getByLabelText("For"), { target: { value: "internal" } });
    expect(screen.getAllByTestId("then-and-now-pair")).toHaveLength(2);
  });
});
