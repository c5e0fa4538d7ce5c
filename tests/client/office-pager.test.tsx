import { fireEvent, screen, within } from "@testing-library/react";
import { useLocation } from "react-router-dom";
import { describe, expect, it } from "vitest";
import { pageRangeLabel, UrlPager } from "../../src/components/ui/pager.tsx";
import { renderWithApp } from "./render.tsx";

// The pager of the site office's long lists: where you are in words ("41–60 of 312"), Previous and
// Next as links that keep the list's filters, and the page in the address.

function Where() {
  const l = useLocation();
  return <output data-testid="where">{l.search}</output>;
}

function Page({ total, pageSize }: { total: number; pageSize: number }) {
  return (
    <>
      <UrlPager total={total} pageSize={pageSize} label="Pages of subscribers" />
      <Where />
    </>
  );
}

describe("pageRangeLabel", () => {
  it.each([
    [3, 20, 312, "41–60 of 312"],
    [1, 50, 7, "1–7 of 7"],
    [16, 20, 312, "301–312 of 312"],
    [1, 50, 0, "0 of 0"],
    [9, 3, 7, "None here: 7 in all"],
    [2, 50, 1234, "51–100 of 1,234"],
  ])("page %i of %i a page, %i rows → %s", (page, size, total, text) => {
    expect(pageRangeLabel(page, size, total)).toBe(text);
  });
});

describe("UrlPager", () => {
  it("says which rows are shown and links to the pages either side, keeping the filters", () => {
    renderWithApp(<Page total={312} pageSize={20} />, { path: "/office/subscribers", route: "/office/subscribers?status=confirmed&page=3" });
    const nav = screen.getByRole("navigation", { name: "Pages of subscribers" });
    expect(within(nav).getByTestId("pager-range").textContent).toBe("41–60 of 312, page 3 of 16");
    expect(within(nav).getByRole("link", { name: "← Previous" }).getAttribute("href")).toBe("/office/subscribers?status=confirmed&page=2");
    expect(within(nav).getByRole("link", { name: "Next →" }).getAttribute("href")).toBe("/office/subscribers?status=confirmed&page=4");
  });

  it("moving to page 1 takes `page` out of the address; the first page offers no Previous link", () => {
    renderWithApp(<Page total={312} pageSize={20} />, { path: "/office/subscribers", route: "/office/subscribers?page=2" });
    fireEvent.click(screen.getByRole("link", { name: "← Previous" }));
    expect(screen.getByTestId("where").textContent).toBe("");
    expect(screen.queryByRole("link", { name: "← Previous" })).toBeNull();
    expect(screen.getByText("← Previous").getAttribute("aria-disabled")).toBe("true");
    expect(screen.getByTestId("pager-range").textContent).toContain("1–20 of 312");
  });

  it("the last page offers no Next link", () => {
    renderWithApp(<Page total={312} pageSize={20} />, { path: "/office/subscribers", route: "/office/subscribers?page=16" });
    expect(screen.queryByRole("link", { name: "Next →" })).toBeNull();
    expect(screen.getByTestId("pager-range").textContent).toContain("301–312 of 312");
  });

  it("a page past the end says so and links back to the last page", () => {
    renderWithApp(<Page total={7} pageSize={3} />, { path: "/x", route: "/x?page=9" });
    expect(screen.getByTestId("pager-range").textContent).toContain("None here: 7 in all");
    expect(screen.getByRole("link", { name: "← Previous" }).getAttribute("href")).toBe("/x?page=3");
  });

  it("a list that fits on one page has no pager", () => {
    renderWithApp(<Page total={7} pageSize={50} />, { path: "/x", route: "/x" });
    expect(screen.queryByRole("navigation")).toBeNull();
  });

  it("an address with a nonsense page reads as page 1", () => {
    renderWithApp(<Page total={120} pageSize={50} />, { path: "/x", route: "/x?page=-4" });
    expect(screen.getByTestId("pager-range").textContent).toContain("1–50 of 120");
  });
});
