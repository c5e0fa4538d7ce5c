import { cleanup, fireEvent, screen, waitFor } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { MilestoneRemoval } from "../../src/features/programme/components/milestone-removal.tsx";
import { renderWithApp } from "./render.tsx";
import { makeMilestone } from "./milestone-fixture.ts";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

// Our own example milestone of the demo scenario.
const milestone = (over: Partial<Milestone> = {}): Milestone =>
  makeMilestone({ id: 7, name: "Temporary cabins cleared", area: "Site compound", percentComplete: 10, forecastFinish: "2027-03-01", version: 3, ...over });

/** The server as the component meets it: a CSRF token, then whatever `answer` says for the call. */
function stubServer(answer: (method: string, url: string, body: unknown) => { status: number; body?: unknown }) {
  const calls: Array<{ method: string; url: string; body: unknown }> = [];
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string, init: RequestInit = {}) => {
      if (url === "/api/auth/csrf") return new Response(JSON.stringify({ token: "t" }), { status: 200, headers: { "Content-Type": "application/json" } });
      const method = init.method ?? "GET";
      const body = typeof init.body === "string" ? JSON.parse(init.body) : undefined;
      calls.push({ method, url, body });
      const a = answer(method, url, body);
      return a.status === 204 ? new Response(null, { status: 204 }) : new Response(JSON.stringify(a.body ?? {}), { status: a.status, headers: { "Content-Type": "application/json" } });
    }),
  );
  return calls;
}

describe("removing a milestone from the programme in the site office", () => {
  it("asks for a reason before anything is sent", async () => {
    const calls = stubServer(() => ({ status: 500 }));
    renderWithApp(<MilestoneRemoval slug="aldermere-phase-2" milestone={milestone()} timeZone="Europe/London" onDone={() => undefined} />);
    fireEvent.click(screen.getByRole("button", { name: "Remove from the programme" }));
    expect(await screen.findByText("say why (at least 5 characters)")).toBeTruthy();
    expect(calls).toEqual([]);
  });

  it("sends the reason to the remove route and closes", async () => {
    const calls = stubServer(() => ({ status: 200, body: milestone({ removal: { at: "2026-12-04T10:00:00Z", by: "Demo Lead", reason: "Cabins stay for Hall 2B" } }) }));
    const onDone = vi.fn();
    renderWithApp(<MilestoneRemoval slug="aldermere-phase-2" milestone={milestone()} timeZone="Europe/London" onDone={onDone} />);
    fireEvent.change(screen.getByLabelText("Reason for removing"), { target: { value: "Cabins stay for Hall 2B" } });
    fireEvent.click(screen.getByRole("button", { name: "Remove from the programme" }));
    await waitFor(() => expect(onDone).toHaveBeenCalled());
    expect(calls).toEqual([{ method: "POST", url: "/api/milestones/7/remove", body: { reason: "Cabins stay for Hall 2B" } }]);
  });

  it("shows why a milestone on record cannot be deleted", async () => {
    const message = "Temporary cabins cleared is on record (it is in baseline v1), so it cannot be deleted. Remove it from the programme instead, with a reason: it leaves every figure and its history stays.";
    stubServer(() => ({ status: 409, body: { error: { code: "on_record", message } } }));
    const onDone = vi.fn();
    renderWithApp(<MilestoneRemoval slug="aldermere-phase-2" milestone={milestone()} timeZone="Europe/London" onDone={onDone} />);
    fireEvent.click(screen.getByRole("button", { name: "Delete instead (entered by mistake)" }));
    expect(await screen.findByText(message)).toBeTruthy();
    expect(onDone).not.toHaveBeenCalled();
  });

  it("a removed milestone shows who removed it and why, and offers a restore with a reason instead", async () => {
    const calls = stubServer(() => ({ status: 200, body: milestone() }));
    renderWithApp(
      <MilestoneRemoval
        slug="aldermere-phase-2"
        milestone={milestone({ removal: { at: "2026-12-04T10:00:00Z", by: "Demo Lead", reason: "Cabins stay for Hall 2B" } })}
        timeZone="Europe/London"
        onDone={() => undefined}
      />,
    );
    expect(screen.getByText("“Cabins stay for Hall 2B”")).toBeTruthy();
    expect(screen.queryByRole("button", { name: /Delete instead/ })).toBeNull();
    fireEvent.change(screen.getByLabelText("Reason for restoring"), { target: { value: "Back in Phase 2 after all" } });
    fireEvent.click(screen.getByRole("button", { name: "Restore to the programme" }));
    await waitFor(() => expect(calls).toEqual([{ method: "POST", url: "/api/milestones/7/restore", body: { reason: "Back in Phase 2 after all" } }]));
  });
});
