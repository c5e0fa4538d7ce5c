import { cleanup, render } from "@testing-library/react";
import { afterEach, describe, expect, it } from "vitest";
import type { MilestoneStatus } from "../../src/shared/domain/programme-health.ts";
import { STATUS_LOOK, StatusKey, StatusMark } from "../../src/components/ui/status-mark.tsx";

afterEach(cleanup);

// Our own rule (DESIGN.md, "Look"): status is shown by word and shape, never by colour alone.
const cases: Array<[MilestoneStatus, string, string]> = [
  ["complete", "Complete", "disc"],
  ["on_programme", "On programme", "ring"],
  ["at_risk", "At risk", "triangle"],
  ["behind", "Behind", "square"],
];

describe("StatusMark", () => {
  for (const [status, word, shape] of cases) {
    it(`shows ${status} as the word "${word}" beside a ${shape}`, () => {
      const { container } = render(<StatusMark status={status} />);
      const mark = container.querySelector(`[data-status="${status}"]`);
      expect(mark?.textContent).toBe(word);
      const svg = mark?.querySelector("svg");
      expect(svg?.getAttribute("data-shape")).toBe(shape);
      // The shape is decoration for sighted readers; the word is what is read out.
      expect(svg?.getAttribute("aria-hidden")).toBe("true");
      expect(svg?.querySelector(shape === "triangle" ? "path" : shape === "square" ? "rect" : "circle")).not.toBeNull();
    });
  }

  it("gives each status a different shape and a different word", () => {
    const shapes = new Set(Object.values(STATUS_LOOK).map((l) => l.shape));
    const words = new Set(Object.values(STATUS_LOOK).map((l) => l.word));
    expect(shapes.size).toBe(4);
    expect(words.size).toBe(4);
  });

  it("draws the ring hollow and the disc filled, so the two read apart without colour", () => {
    const ring = render(<StatusMark status="on_programme" />).container.querySelector("circle");
    expect(ring?.getAttribute("stroke")).toBe(STATUS_LOOK.on_programme.color);
    expect(ring?.getAttribute("fill")).not.toBe(STATUS_LOOK.on_programme.color);
    cleanup();
    const disc = render(<StatusMark status="complete" />).container.querySelector("circle");
    expect(disc?.getAttribute("fill")).toBe(STATUS_LOOK.complete.color);
  });

  it("keeps the word for screen readers when it is hidden on screen", () => {
    const { container } = render(<StatusMark status="behind" wordHidden />);
    const word = container.querySelector(".sr-only");
    expect(word?.textContent).toBe("Behind");
  });

  it("lists all four statuses in the key, in order", () => {
    const { getByRole } = render(<StatusKey />);
    const items = [...getByRole("list", { name: "Status key" }).querySelectorAll("li")].map((li) => li.textContent);
    expect(items).toEqual(["Complete", "On programme", "At risk", "Behind"]);
  });
});
