import type { QueryClient } from "@tanstack/react-query";
import { Fragment, type ComponentProps, type ReactNode } from "react";
import type { Role } from "#shared/schemas/common.ts";
import { ProjectPicker } from "../components/ui/project-picker.tsx";
import { Notice, PageHeader } from "../components/ui/sheet.tsx";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "./loaders.ts";
import { officeProjectSlug, type projectListQueryOptions, type useProjectParam } from "./projects.ts";

/*
 * What the site office's pages that work on one project share (the programme, the facility, the
 * site plan, the media library, the investor record): the loader that primes the chosen project,
 * and the frame of the page around it.
 */

/**
 * A site-office page's loader: for `roles` (staff by default), the project it works on
 * (`?project=` or the first one) and whatever `prime` reads of it.
 */
export function officePageLoader(projects: () => ReturnType<typeof projectListQueryOptions>, prime: (qc: QueryClient, slug: string) => Promise<unknown>, roles: readonly Role[] = OFFICE_ROLES): RouteLoader {
  return (qc) =>
    ({ request }) =>
      primeWhenAllowed(qc, roles, async () => {
        const slug = await officeProjectSlug(qc, projects(), new URL(request.url).searchParams);
        if (slug) await prime(qc, slug);
      });
}

/** What a site-office page says in place of its body while the office has no project yet. */
export function NoProjectNotice() {
  return <Notice>There is no project in this site office yet.</Notice>;
}

/**
 * A site-office page that works on one project: its head, the project picker (`pickerClassName`
 * places it), and the body for the chosen project, drawn anew when another is chosen.
 */
export function OfficeProjectPage({ project, pickerClassName, children, ...head }: ComponentProps<typeof PageHeader> & { project: ReturnType<typeof useProjectParam>; pickerClassName?: string; children: (slug: string) => ReactNode }) {
  const { slug, choices, setSlug } = project;
  return (
    <>
      <PageHeader {...head} />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className={pickerClassName} />
      {slug ? <Fragment key={slug}>{children(slug)}</Fragment> : <NoProjectNotice />}
    </>
  );
}
