import { cleanup, fireEvent, screen, waitFor } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import { CarryLoadSetting } from "../../src/features/facility/components/carry-load-setting.tsx";
import { jsonAnswer, stubFetch } from "./fetch-stub.ts";
import { renderWithApp } from "./render.tsx";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe("the level from which a unit carries its load (office facility page)", () => {
  it("shows the project's level, saves only a change, and sends the number the API takes", async () => {
    const calls: Array<{ method: string; url: string; body: unknown }> = [];
    stubFetch(({ method, url, init }) => {
      calls.push({ method, url, body: init.body ? JSON.parse(String(init.body)) : null });
      return jsonAnswer(200, { availableFromLevel: 5 });
    });
    renderWithApp(<CarryLoadSetting slug="aldermere-phase-2" level={4} />);
    const select = screen.getByLabelText("A unit carries its load from") as HTMLSelectElement;
    expect(select.value).toBe("4");
    const save = screen.getByRole("button", { name: "Save level" }) as HTMLButtonElement;
    expect(save.disabled).toBe(true);
    fireEvent.change(select, { target: { value: "5" } });
    await waitFor(() => expect(save.disabled).toBe(false));
    fireEvent.click(save);
    await waitFor(() => expect(calls).toHaveLength(1));
    expect(calls[0]).toEqual({ method: "PUT", url: "/api/projects/aldermere-phase-2/facility/settings", body: { availableFromLevel: 5 } });
  });
});
