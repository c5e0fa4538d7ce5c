import { fireEvent, screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import type { Project } from "../../src/shared/schemas/projects.ts";
import type { SearchAnswer } from "../../src/shared/schemas/search.ts";
import { siteKeys } from "../../src/features/public-site/api.ts";
import { searchKeys } from "../../src/features/public-site/search-api.ts";
import { groupResults, SearchPage } from "../../src/features/public-site/search-routes.tsx";
import { renderWithApp } from "./render.tsx";

const SLUG = "aldermere-phase-2";
// Invented answers in the shape of the demo (Aldermere Campus Phase 2), as the route sends them.
const project = { id: 1, slug: SLUG, name: "Aldermere Campus, Phase 2", operatorName: "Kestrel Colocation", timeZone: "Europe/London" } as unknown as Project;
const answer: SearchAnswer = {
  total: 4,
  results: [
    { kind: "update", title: "Chillers on their plinths", url: `/projects/${SLUG}/updates/chillers-on-their-plinths`, snippet: "Four of the five 400 kW <mark>chillers</mark> are set &amp; piped." },
    { kind: "system", title: "Chillers", url: `/projects/${SLUG}/facility#system-2`, snippet: "design N+1 · Five air-cooled <mark>chillers</mark>" },
    { kind: "milestone", title: "Chillers delivered and set", url: `/projects/${SLUG}/timeline#milestone-9`, snippet: "Plant · Plant yard · Five 400 kW <mark>chillers</mark>" },
    { kind: "update", title: "Ground broken on Phase 2", url: `/projects/${SLUG}/updates/ground-broken`, snippet: "the <mark>chiller</mark> bases set out &lt;script&gt;alert(1)&lt;/script&gt;" },
  ],
};

function show(q: string, data: SearchAnswer) {
  return renderWithApp(<SearchPage />, {
    path: "/projects/:slug/search",
    route: `/projects/${SLUG}/search?q=${encodeURIComponent(q)}`,
    data: [
      [siteKeys.detail(SLUG), project],
      [searchKeys.search(SLUG, q), data],
    ],
  });
}

describe("the search page (/projects/:slug/search)", () => {
  it("shows the count and the results grouped by kind, blocks and plant before milestones and updates", () => {
    show("chill", answer);
    expect(screen.getByTestId("search-count").textContent).toBe("4 results for “chill”");
    const headings = screen.getAllByRole("heading", { level: 2 }).map((h) => h.textContent);
    expect(headings).toEqual(["Plant (1)", "Programme milestones (1)", "Updates (2)"]);
    const updates = within(screen.getByTestId("search-group-update")).getAllByRole("link").map((a) => a.getAttribute("href"));
    expect(updates).toEqual([`/projects/${SLUG}/updates/chillers-on-their-plinths`, `/projects/${SLUG}/updates/ground-broken`]);
    expect(document.title).toBe("“chill” · Search · Aldermere Campus, Phase 2");
  });

  it("highlights the matched words and shows the rest as text, never as markup", () => {
    const { container } = show("chill", answer);
    expect([...container.querySelectorAll("mark")].map((m) => m.textContent)).toEqual(["chillers", "chillers", "chillers", "chiller"]);
    expect(container.querySelector("script")).toBeNull();
    expect(screen.getByText(/bases set out <script>alert\(1\)<\/script>/)).toBeTruthy();
    expect(screen.getByText(/are set & piped\./)).toBeTruthy();
  });

  it("says plainly when nothing matches, and searching again puts the words in the address", () => {
    show("HD-9", { total: 0, results: [] });
    expect(screen.getByTestId("search-count").textContent).toBe("Nothing matches “HD-9”. Try a shorter word, or a code such as HD-1.");
    const box = screen.getByLabelText("Words or codes") as HTMLInputElement;
    expect(box.value).toBe("HD-9");
    fireEvent.change(box, { target: { value: "HD-1" } });
    fireEvent.click(screen.getByRole("button", { name: "Search" }));
    expect(document.title).toBe("“HD-1” · Search · Aldermere Campus, Phase 2");
  });

  it("groups in the fixed order of kinds, keeping each kind's order", () => {
    expect(groupResults(answer.results).map(([k, list]) => [k, list.length])).toEqual([
      ["system", 1],
      ["milestone", 1],
      ["update", 2],
    ]);
  });
});
