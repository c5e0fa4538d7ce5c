import { cleanup, fireEvent, screen, waitFor } from "@testing-library/react";
import { afterEach, describe, expect, it, vi } from "vitest";
import { CalendarFeedPanel } from "../../src/features/calendars/calendar-feed-panel.tsx";
import { jsonAnswer, stubFetch } from "./fetch-stub.ts";
import { renderWithApp } from "./render.tsx";

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const SLUG = "aldermere-phase-2";
const FIRST = "https://plumbline.example/calendars/AbCdEfGhIjKlMnOpQrStUvWxYz0123456789_-abcde.ics";
const SECOND = "https://plumbline.example/calendars/ZyXwVuTsRqPoNmLkJiHgFeDcBa9876543210-_zyxwv.ics";

/** The calendar-feed routes as the panel meets them: each POST answers the next address in turn. */
function stubFeeds(posts: Array<{ status: number; body: unknown }>) {
  const calls: Array<{ method: string; url: string; csrf: string | null }> = [];
  stubFetch(({ method, url, init }) => {
    calls.push({ method, url, csrf: new Headers(init.headers).get("X-CSRF-Token") });
    if (method === "DELETE") return new Response(null, { status: 204 });
    const next = posts.shift()!;
    return jsonAnswer(next.status, next.body);
  });
  return calls;
}

describe("Follow these dates in your calendar", () => {
  it("shows the address once it is made, copies it, makes a new one in its place, and stops it", async () => {
    const calls = stubFeeds([
      { status: 201, body: { url: FIRST, createdAt: "2026-11-04T10:00:00.000Z" } },
      { status: 201, body: { url: SECOND, createdAt: "2026-11-04T10:05:00.000Z" } },
    ]);
    const writeText = vi.fn(async () => undefined);
    vi.stubGlobal("navigator", { ...navigator, clipboard: { writeText } });
    renderWithApp(<CalendarFeedPanel slug={SLUG} />);

    expect(screen.getByRole("heading", { name: "Follow these dates in your calendar" })).toBeTruthy();
    // Nothing is fetched until asked: the address exists only in the answer that makes it.
    expect(screen.queryByLabelText(/Your calendar address/)).toBeNull();
    expect(calls).toHaveLength(0);

    fireEvent.click(screen.getByRole("button", { name: "Make my calendar address" }));
    const address = (await screen.findByLabelText("Your calendar address (shown only now)")) as HTMLInputElement;
    expect(address.value).toBe(FIRST);
    expect(address.readOnly).toBe(true);
    expect(calls[0]).toEqual({ method: "POST", url: `/api/projects/${SLUG}/calendar-feed`, csrf: "t" });

    fireEvent.click(screen.getByRole("button", { name: "Copy" }));
    await waitFor(() => expect(writeText).toHaveBeenCalledWith(FIRST));
    expect(await screen.findByText(/Copied\./)).toBeTruthy();

    fireEvent.click(screen.getByRole("button", { name: "Make a new address" }));
    await waitFor(() => expect((screen.getByLabelText("Your calendar address (shown only now)") as HTMLInputElement).value).toBe(SECOND));

    fireEvent.click(screen.getByRole("button", { name: "Stop my calendar address" }));
    expect(await screen.findByText(/Stopped: calendars subscribed to your old address get no more dates\./)).toBeTruthy();
    expect(screen.queryByLabelText(/Your calendar address/)).toBeNull();
    expect(calls.map((c) => c.method)).toEqual(["POST", "POST", "DELETE"]);
  });

  it("says why when the address could not be made, with a mark as well as colour", async () => {
    stubFeeds([{ status: 401, body: { error: { code: "unauthenticated", message: "Sign in first." } } }]);
    renderWithApp(<CalendarFeedPanel slug={SLUG} />);
    fireEvent.click(screen.getByRole("button", { name: "Make my calendar address" }));
    const alert = await screen.findByRole("alert");
    expect(alert.textContent).toBe("✕ Sign in first.");
    expect(screen.queryByLabelText(/Your calendar address/)).toBeNull();
  });
});
