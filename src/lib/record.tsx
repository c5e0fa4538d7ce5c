import { useSuspenseQuery, type QueryClient } from "@tanstack/react-query";
import type { ReactNode } from "react";
import type { User } from "#shared/schemas/auth.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { ProjectPicker } from "../components/ui/project-picker.tsx";
import { Notice, PageHeader } from "../components/ui/sheet.tsx";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "./loaders.ts";
import { AUDIENCE_WORD } from "./words.ts";
import { officeProjectSlug, useProjectParam, type projectListQueryOptions } from "./projects.ts";

/*
 * What the site office's four pages of the investor record (risks, decisions, budget,
 * documents) share: who keeps the record, its two audiences, and the frame of a page that
 * works on one project.
 */

/** Lead and admin keep the record; marketing reads its investor-audience items (the server filters). */
export function canKeepRecord(user: User | null | undefined): boolean {
  return user?.role === "lead" || user?.role === "admin";
}

/** Nothing of the record is ever public: investors, or staff only. */
export const RECORD_AUDIENCE_WORD: Record<RecordAudience, string> = { investor: AUDIENCE_WORD.investor, internal: AUDIENCE_WORD.internal };
export const RECORD_AUDIENCE_OPTIONS = (["investor", "internal"] as const).map((a) => ({ value: a, label: RECORD_AUDIENCE_WORD[a] }));

type ProjectList = ReturnType<typeof projectListQueryOptions>;

/**
 * A record page's loader: for staff, the project it works on (`?project=` or the first one)
 * and whatever `prime` reads of it.
 */
export function recordPageLoader(projects: () => ProjectList, prime: (qc: QueryClient, slug: string) => Promise<unknown>, roles = OFFICE_ROLES): RouteLoader {
  return (qc) =>
    ({ request }) =>
      primeWhenAllowed(qc, roles, async () => {
        const slug = await officeProjectSlug(qc, projects(), new URL(request.url).searchParams);
        if (slug) await prime(qc, slug);
      });
}

/** A record page: its head, the project picker, and the body for the chosen project (remounted when it changes). */
export function RecordPage({ projects, sheet, title, description, children }: { projects: () => ProjectList; sheet: string; title: string; description: ReactNode; children: (slug: string) => ReactNode }) {
  const { slug, choices, setSlug } = useProjectParam(useSuspenseQuery(projects()).data);
  return (
    <>
      <PageHeader sheet={sheet} title={title} description={description} />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="mb-4 w-64" />
      {slug ? <div key={slug}>{children(slug)}</div> : <Notice>There is no project in this site office yet.</Notice>}
    </>
  );
}
