import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { act, fireEvent, render, screen, waitFor } from "@testing-library/react";
import type { ComponentType } from "react";
import { createMemoryRouter, RouterProvider, type LoaderFunction } from "react-router-dom";
import { afterEach, describe, expect, it, vi } from "vitest";
import { EnquiryPatchSchema, type EnquiryOwner, type EnquiryRow } from "#shared/schemas/enquiries.ts";
import { AcceptInvitationPage, invitationLoader, InvitationError } from "../../src/features/auth/routes.tsx";
import { enquiryKeys } from "../../src/features/enquiries/api.ts";
import { EnquiriesPage } from "../../src/features/enquiries/routes.tsx";
import { ConfirmationLinkError, confirmationLoader, ConfirmSubscriptionPage } from "../../src/features/subscribers/routes.tsx";
import type { RouteLoader } from "../../src/lib/loaders.ts";
import { renderWithApp } from "./render.tsx";

type Answer = { status: number; body: unknown };

/** The API as the browser would reach it: each path answers as listed, anything else is a 500 the test would see. */
function stubApi(answers: Record<string, Answer>) {
  const fetchMock = vi.fn(async (url: string, _init?: RequestInit) => {
    const a = answers[url] ?? { status: 500, body: { error: { code: "unexpected", message: `unexpected ${url}` } } };
    return new Response(JSON.stringify(a.body), { status: a.status, headers: { "content-type": "application/json" } });
  });
  vi.stubGlobal("fetch", fetchMock);
  return fetchMock;
}

/** One route as the app builds it: the loader made with the query client, the page, and the module's own error element. */
async function openRoute(path: string, at: string, parts: { loader: RouteLoader; Component: ComponentType; ErrorBoundary: ComponentType }) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const router = createMemoryRouter([{ path, loader: parts.loader(qc) as LoaderFunction, Component: parts.Component, ErrorBoundary: parts.ErrorBoundary }], { initialEntries: [at] });
  await act(async () => {
    render(
      <QueryClientProvider client={qc}>
        <RouterProvider router={router} />
      </QueryClientProvider>,
    );
  });
}

const TOKEN = "abcdefghijkl.0123456789abcdefghijklmnopqrstuvwxyzABCDEFGHIJK";

describe("a signed link's loader and its error element", () => {
  afterEach(() => vi.unstubAllGlobals());

  it("when the confirmation link has expired, the loader's refusal ends in the page's own words, with the way to subscribe again", async () => {
    stubApi({ [`/api/subscriptions/confirm/${TOKEN}`]: { status: 410, body: { error: { code: "token_expired", message: "This confirmation link expired after 7 days." } } } });
    await openRoute("/subscriptions/confirm/:token", `/subscriptions/confirm/${TOKEN}`, { loader: confirmationLoader, Component: ConfirmSubscriptionPage, ErrorBoundary: ConfirmationLinkError });
    await screen.findByRole("heading", { level: 1, name: "Confirm your subscription" });
    expect(screen.getByText("This link has expired")).toBeTruthy();
    expect(screen.getByText(/expired after 7 days/)).toBeTruthy();
    expect(screen.getByRole("link", { name: "Subscribe again" }).getAttribute("href")).toBe("/subscribe");
    expect(screen.queryByRole("button", { name: "Confirm subscription" })).toBeNull();
  });

  it("when the confirmation link is good, the page opens on what the loader primed, and changes nothing by opening", async () => {
    const fetchMock = stubApi({
      [`/api/subscriptions/confirm/${TOKEN}`]: {
        status: 200,
        body: { email: "agnes@example.org", name: "Agnes", project: { slug: "aldermere-phase-2", name: "Aldermere Campus, Phase 2" }, status: "pending", consent: { version: "2026-12-01", text: "Send me e-mail." } },
      },
    });
    await openRoute("/subscriptions/confirm/:token", `/subscriptions/confirm/${TOKEN}`, { loader: confirmationLoader, Component: ConfirmSubscriptionPage, ErrorBoundary: ConfirmationLinkError });
    await screen.findByRole("button", { name: "Confirm subscription" });
    expect(screen.getByText(/one step left to receive progress e-mails about Aldermere Campus, Phase 2 at agnes@example.org/)).toBeTruthy();
    expect(fetchMock.mock.calls.every(([, init]) => (init?.method ?? "GET") === "GET")).toBe(true);
  });

  it("when the invitation is unknown, the loader's 404 ends in the invitation's own error element, with the way to sign in", async () => {
    const token = "abcdefghijklmnopqrstuvwxyz012345";
    stubApi({ [`/api/auth/invitations/${token}`]: { status: 404, body: { error: { code: "not_found", message: "This invitation is not valid. Ask for a new one." } } } });
    await openRoute("/invitations/:token", `/invitations/${token}`, { loader: invitationLoader, Component: AcceptInvitationPage, ErrorBoundary: InvitationError });
    await screen.findByRole("heading", { name: "This invitation cannot be used" });
    expect(screen.getByText("This invitation is not valid. Ask for a new one.")).toBeTruthy();
    expect(screen.getByRole("link", { name: "Go to sign-in" }).getAttribute("href")).toBe("/sign-in");
    expect(screen.queryByLabelText("Choose a password")).toBeNull();
  });
});

const enquiry: EnquiryRow = {
  id: 5,
  project: { slug: "aldermere-phase-2", name: "Aldermere Campus, Phase 2" },
  kind: "capacity",
  name: "Priya Ramsden",
  email: "priya@example.org",
  organisation: "Northgate Analytics",
  phone: null,
  message: null,
  racks: 12,
  kwPerRack: 15,
  neededBy: "2027-09-01",
  preferredDates: [],
  partySize: null,
  status: "new",
  owner: null,
  notes: "",
  createdAt: "2027-03-01T09:00:00.000Z",
  updatedAt: "2027-03-01T09:00:00.000Z",
};
const owners: EnquiryOwner[] = [{ id: 2, name: "Morgan Hale", role: "marketing" }];

describe("the enquiry form of the site office (react-hook-form with the shared schema)", () => {
  afterEach(() => vi.restoreAllMocks());

  it("refuses notes over the limit with the server's own message, and sends nothing", async () => {
    const fetchSpy = vi.spyOn(globalThis, "fetch");
    renderWithApp(<EnquiriesPage />, {
      path: "/office/enquiries",
      route: "/office/enquiries?open=5",
      data: [
        [enquiryKeys.list({}), [enquiry]],
        [enquiryKeys.detail(5), enquiry],
        [enquiryKeys.owners(), owners],
      ],
    });
    const notes = await screen.findByLabelText("Notes");
    const tooLong = "x".repeat(10_001);
    fireEvent.change(notes, { target: { value: tooLong } });
    fireEvent.click(screen.getByRole("button", { name: "Save" }));
    // The message the server's PATCH /api/enquiries/:id would give for the same notes.
    const serverSays = EnquiryPatchSchema.safeParse({ notes: tooLong }).error?.issues[0]?.message;
    expect(serverSays).toBe("must be at most 10,000 characters");
    await waitFor(() => expect(screen.getByText(serverSays!)).toBeTruthy());
    expect(notes.getAttribute("aria-invalid")).toBe("true");
    expect(fetchSpy.mock.calls.filter(([url]) => String(url).includes("/api/enquiries"))).toHaveLength(0);
  });

  it("opens on the enquiry's own status, owner and notes", async () => {
    renderWithApp(<EnquiriesPage />, {
      path: "/office/enquiries",
      route: "/office/enquiries?open=5",
      data: [
        [enquiryKeys.list({}), [enquiry]],
        [enquiryKeys.detail(5), { ...enquiry, status: "contacted", owner: { id: 2, name: "Morgan Hale" }, notes: "Called on Tuesday." }],
        [enquiryKeys.owners(), owners],
      ],
    });
    // The list's own filter is also labelled "Status"; the enquiry's field comes after it.
    const status = (await screen.findAllByLabelText("Status")).at(-1) as HTMLSelectElement;
    expect(status.value).toBe("contacted");
    expect((screen.getByLabelText("Owner") as HTMLSelectElement).value).toBe("2");
    expect((screen.getByLabelText("Notes") as HTMLTextAreaElement).value).toBe("Called on Tuesday.");
  });
});
