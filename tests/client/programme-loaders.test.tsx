import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { act, render, screen } from "@testing-library/react";
import { createMemoryRouter, RouterProvider, type LoaderFunction } from "react-router-dom";
import { afterEach, describe, expect, it, vi } from "vitest";
import { WHOLE_PROGRAMME_NOTE } from "../../src/shared/domain/programme-health.ts";
import { RouteErrorPage } from "../../src/app/pages/misc-pages.tsx";
import { baselinesQueryOptions, healthQueryOptions, milestonesQueryOptions, programmeProjectQueryOptions, REMOVED_ONLY } from "../../src/features/programme/api.ts";
import { PublicTimelinePage, publicTimelineLoader } from "../../src/features/programme/public-routes.tsx";
import { programmeLoader, siteWalkLoader } from "../../src/features/programme/routes.tsx";
import type { RouteLoader } from "../../src/lib/loaders.ts";
import { makeMilestone } from "./milestone-fixture.ts";

afterEach(() => vi.unstubAllGlobals());

const SLUG = "aldermere-phase-2";
const PROJECT = { id: 1, slug: SLUG, name: "Aldermere Campus, Phase 2", timeZone: "Europe/London", settings: { toleranceWorkingDays: 5, behindWorkingDays: 15, weekendDays: [6, 0], holidays: [] } };
const MILESTONE = makeMilestone({
  id: 11,
  name: "Hall 2A ready for service",
  phase: "Handover",
  phaseId: 3,
  system: "fit-out",
  weight: 3,
  baselineFinish: "2099-03-01",
  forecastFinish: "2099-03-01",
  updatedAt: "2026-01-05T09:00:00.000Z",
});
const LEAD = { user: { id: 2, email: "lead@kestrel.example", name: "Lead", role: "lead" } };

type Answers = Record<string, { status: number; body: unknown }>;

/** Answers each GET by its path; anything not listed is a 500 naming it, so a stray request shows. */
function answer(answers: Answers): string[] {
  const asked: string[] = [];
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string) => {
      asked.push(url);
      const a = answers[url] ?? { status: 500, body: { error: { code: "unexpected", message: `unexpected ${url}` } } };
      return new Response(JSON.stringify(a.body), { status: a.status, headers: { "content-type": "application/json" } });
    }),
  );
  return asked;
}

async function open(path: string, loader: RouteLoader, element: React.ReactElement, at: string, what: string) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  const router = createMemoryRouter([{ path, loader: loader(qc) as LoaderFunction, element, errorElement: <RouteErrorPage what={what} /> }], { initialEntries: [at] });
  await act(async () => {
    render(
      <QueryClientProvider client={qc}>
        <RouterProvider router={router} />
      </QueryClientProvider>,
    );
  });
  return qc;
}

describe("the public timeline's loader", () => {
  it("primes the project, its public milestones and the whole programme's figures, so the page shows them without a loading state of its own", async () => {
    const asked = answer({
      [`/api/projects/${SLUG}`]: { status: 200, body: PROJECT },
      [`/api/projects/${SLUG}/milestones?audience=public`]: { status: 200, body: [MILESTONE] },
      [`/api/projects/${SLUG}/health`]: { status: 200, body: { at: "2026-01-05", percentComplete: 56.4, forecastCompletion: "2099-06-30" } },
    });
    await open("/projects/:slug/timeline", publicTimelineLoader, <PublicTimelinePage />, `/projects/${SLUG}/timeline`, "project");
    await screen.findByRole("heading", { name: "When each part will be ready" });
    expect(screen.getByRole("heading", { name: "Hall 2A ready for service" })).toBeTruthy();
    expect(screen.queryByRole("status")).toBeNull();
    // The headline is the whole programme's, and the page says so in one line beside it.
    expect(screen.getByTestId("timeline-headline").textContent).toContain("56%");
    expect(screen.getByTestId("whole-programme-note").textContent).toBe(WHOLE_PROGRAMME_NOTE);
    expect([...asked].sort()).toEqual([`/api/projects/${SLUG}`, `/api/projects/${SLUG}/health`, `/api/projects/${SLUG}/milestones?audience=public`]);
  });

  it("when the project is not there, ends in the route's error element naming what is missing, with a way back", async () => {
    answer({
      "/api/projects/no-such-build": { status: 404, body: { error: { code: "not_found", message: "That project was not found." } } },
      "/api/projects/no-such-build/milestones?audience=public": { status: 404, body: { error: { code: "not_found", message: "That project was not found." } } },
      "/api/projects/no-such-build/health": { status: 404, body: { error: { code: "not_found", message: "That project was not found." } } },
    });
    await open("/projects/:slug/timeline", publicTimelineLoader, <PublicTimelinePage />, "/projects/no-such-build/timeline", "project");
    await screen.findByRole("heading", { name: "No such project" });
    expect(screen.queryByRole("heading", { name: "When each part will be ready" })).toBeNull();
    expect(screen.getByRole("link", { name: "Back to the progress site" }).getAttribute("href")).toBe("/");
  });
});

describe("the site office programme's loaders", () => {
  const office: Answers = {
    "/api/auth/session": { status: 200, body: LEAD },
    "/api/projects": { status: 200, body: [PROJECT] },
    [`/api/projects/${SLUG}`]: { status: 200, body: PROJECT },
    [`/api/projects/${SLUG}/milestones`]: { status: 200, body: [MILESTONE] },
    [`/api/projects/${SLUG}/milestones?removed=only`]: { status: 200, body: [] },
    [`/api/projects/${SLUG}/health`]: { status: 200, body: { at: "2026-01-05" } },
    [`/api/projects/${SLUG}/baselines`]: { status: 200, body: [] },
  };

  it("prime, for a member of staff, the first project's programme, its removed milestones and its baselines", async () => {
    answer(office);
    const qc = await open("/office/programme", programmeLoader, <p>the programme</p>, "/office/programme", "project");
    await screen.findByText("the programme");
    expect(qc.getQueryData(programmeProjectQueryOptions(SLUG).queryKey)).toEqual(PROJECT);
    expect(qc.getQueryData(milestonesQueryOptions(SLUG).queryKey)).toEqual([MILESTONE]);
    expect(qc.getQueryData(milestonesQueryOptions(SLUG, REMOVED_ONLY).queryKey)).toEqual([]);
    expect(qc.getQueryData(healthQueryOptions(SLUG).queryKey)).toEqual({ at: "2026-01-05" });
    expect(qc.getQueryData(baselinesQueryOptions(SLUG).queryKey)).toEqual([]);
  });

  it("prime the project named by ?project= for the site walk, and nothing the walk does not show", async () => {
    const asked = answer(office);
    await open("/office/programme/walk", siteWalkLoader, <p>the walk</p>, `/office/programme/walk?project=${SLUG}`, "project");
    await screen.findByText("the walk");
    expect([...asked].sort()).toEqual(["/api/auth/session", "/api/projects", `/api/projects/${SLUG}`, `/api/projects/${SLUG}/health`, `/api/projects/${SLUG}/milestones`]);
  });

  it("prime nothing for a signed-out visitor, whom the office's guard then sends to sign in", async () => {
    const asked = answer({ "/api/auth/session": { status: 200, body: { user: null } } });
    await open("/office/programme", programmeLoader, <p>the programme</p>, "/office/programme", "project");
    await screen.findByText("the programme");
    expect(asked).toEqual(["/api/auth/session"]);
  });

  it("when the project asked for is not there, end in the route's error element", async () => {
    const missing = { status: 404, body: { error: { code: "not_found", message: "That project was not found." } } };
    const paths = ["", "/milestones", "/milestones?removed=only", "/health", "/baselines"].map((p) => `/api/projects/no-such-build${p}`);
    answer({ ...office, ...Object.fromEntries(paths.map((p) => [p, missing])) });
    await open("/office/programme", programmeLoader, <p>the programme</p>, "/office/programme?project=no-such-build", "project");
    await screen.findByRole("heading", { name: "No such project" });
    expect(screen.queryByText("the programme")).toBeNull();
  });
});
