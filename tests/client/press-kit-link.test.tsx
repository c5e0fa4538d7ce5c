import { screen, within } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { PressKitLink } from "../../src/features/public-site/components/press-kit-link.tsx";
import { pressKitKeys } from "../../src/features/public-site/press-kit-api.ts";
import { renderWithApp } from "./render.tsx";

// Our own examples, in the demo's words (Aldermere Phase 2, Kestrel Colocation).
const SLUG = "aldermere-phase-2";

describe("'Download these photographs' on the public site", () => {
  it("links the gallery's area to the public zip and prints the project's usage terms under it", () => {
    renderWithApp(<PressKitLink slug={SLUG} operatorName="Kestrel Colocation" of={{ area: "Hall 2A" }} what="every public photograph of Hall 2A" />, {
      data: [[pressKitKeys.terms(SLUG), { usageTerms: "Free to publish with the credit shown." }]],
    });
    const box = screen.getByTestId("press-kit-link");
    const link = within(box).getByRole("link", { name: "Download these photographs" });
    expect(link.getAttribute("href")).toBe("/projects/aldermere-phase-2/press-kit.zip?area=Hall+2A");
    expect(link.hasAttribute("download")).toBe(true);
    expect(box.textContent).toContain("Usage terms: Free to publish with the credit shown.");
  });

  it("names the operator to ask when the project has set no terms, and a story by its address", () => {
    renderWithApp(<PressKitLink slug={SLUG} operatorName="Kestrel Colocation" of={{ story: "plant-yard" }} what="the story's photographs" />, { data: [[pressKitKeys.terms(SLUG), { usageTerms: null }]] });
    const box = screen.getByTestId("press-kit-link");
    expect(within(box).getByRole("link", { name: "Download these photographs" }).getAttribute("href")).toBe("/projects/aldermere-phase-2/press-kit.zip?story=plant-yard");
    expect(box.textContent).toContain("Ask Kestrel Colocation before publishing them.");
  });
});
