import { act, fireEvent, render, screen } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import { COMPARE_STEP, CompareSlider } from "../../src/components/ui/compare-slider.tsx";
import type { PictureData } from "../../src/components/ui/picture.tsx";

const pic = (id: number, takenOn: string): PictureData => ({
  id,
  width: 1600,
  height: 1067,
  altText: `The plant yard on ${takenOn}`,
  sources: { avif: [], webp: [{ url: `/media/v/p${id}-640w.webp`, width: 640, height: 427, format: "webp" }], jpeg: [] },
});

function renderSlider(initial?: number) {
  const utils = render(
    <CompareSlider before={pic(1, "10 March 2026")} after={pic(2, "15 September 2026")} beforeLabel="Then · 10 March 2026" afterLabel="Now · 15 September 2026" label="Plant yard: compare" sizes="100vw" initial={initial} />,
  );
  const slider = screen.getByRole("slider", { name: "Plant yard: compare" });
  const before = utils.getByTestId("compare-before");
  return { ...utils, slider, before, value: () => Number(slider.getAttribute("aria-valuenow")) };
}

describe("CompareSlider", () => {
  it("is a focusable ARIA slider from 0 to 100, starting in the middle, with both capture dates shown", () => {
    const { slider, value } = renderSlider();
    expect(slider.tabIndex).toBe(0);
    expect(slider.getAttribute("aria-valuemin")).toBe("0");
    expect(slider.getAttribute("aria-valuemax")).toBe("100");
    expect(value()).toBe(50);
    expect(slider.getAttribute("aria-valuetext")).toBe("50% earlier photo, 50% later photo");
    expect(screen.getByText("Then · 10 March 2026")).toBeTruthy();
    expect(screen.getByText("Now · 15 September 2026")).toBeTruthy();
  });

  it("moves by a step with the arrow keys, four steps with Page Up and Page Down, and to the ends with Home and End, never past them", () => {
    const { slider, value, before } = renderSlider();
    fireEvent.keyDown(slider, { key: "ArrowRight" });
    expect(value()).toBe(50 + COMPARE_STEP);
    fireEvent.keyDown(slider, { key: "ArrowLeft" });
    fireEvent.keyDown(slider, { key: "ArrowLeft" });
    fireEvent.keyDown(slider, { key: "ArrowDown" });
    expect(value()).toBe(50 - 2 * COMPARE_STEP);
    fireEvent.keyDown(slider, { key: "ArrowUp" });
    expect(value()).toBe(50 - COMPARE_STEP);
    fireEvent.keyDown(slider, { key: "PageUp" });
    expect(value()).toBe(50 + 3 * COMPARE_STEP);
    fireEvent.keyDown(slider, { key: "PageDown" });
    expect(value()).toBe(50 - COMPARE_STEP);
    // The earlier photo shows left of the divider: its layer is clipped from the right.
    expect(before.style.clipPath).toBe(`inset(0 ${100 - (50 - COMPARE_STEP)}% 0 0)`);
    fireEvent.keyDown(slider, { key: "Home" });
    expect(value()).toBe(0);
    fireEvent.keyDown(slider, { key: "ArrowLeft" });
    fireEvent.keyDown(slider, { key: "PageDown" });
    expect(value()).toBe(0);
    expect(before.style.clipPath).toBe("inset(0 100% 0 0)");
    fireEvent.keyDown(slider, { key: "End" });
    expect(value()).toBe(100);
    fireEvent.keyDown(slider, { key: "ArrowRight" });
    expect(value()).toBe(100);
    expect(slider.getAttribute("aria-valuetext")).toBe("100% earlier photo, 0% later photo");
  });

  it("ignores keys that are not its own, so Tab still leaves it", () => {
    const { slider, value } = renderSlider(30);
    const tab = fireEvent.keyDown(slider, { key: "Tab" });
    const letter = fireEvent.keyDown(slider, { key: "a" });
    expect(value()).toBe(30);
    // fireEvent answers false when a handler called preventDefault.
    expect(tab).toBe(true);
    expect(letter).toBe(true);
    expect(fireEvent.keyDown(slider, { key: "ArrowLeft" })).toBe(false);
  });

  it("follows a pointer dragged across the frame", () => {
    const { getByTestId, value } = renderSlider();
    const frame = getByTestId("compare-slider");
    // jsdom lays nothing out; the frame is given a box 400 px wide from x = 100.
    frame.getBoundingClientRect = () => ({ left: 100, width: 400, top: 0, height: 267, right: 500, bottom: 267, x: 100, y: 0, toJSON: () => ({}) });
    // jsdom has no PointerEvent; React reads clientX from any mouse event named pointer….
    const pointer = (type: string, clientX: number) => act(() => void frame.dispatchEvent(new MouseEvent(type, { bubbles: true, clientX })));
    pointer("pointerdown", 200);
    expect(value()).toBe(25);
    pointer("pointermove", 400);
    expect(value()).toBe(75);
    pointer("pointermove", 900);
    expect(value()).toBe(100);
    pointer("pointerup", 900);
    pointer("pointermove", 150);
    // After release a move does nothing.
    expect(value()).toBe(100);
  });
});
