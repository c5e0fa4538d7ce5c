import { useQuery, useSuspenseQuery, type QueryClient, type QueryKey, type UseSuspenseQueryOptions } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { useParams } from "react-router-dom";
import type { User } from "#shared/schemas/auth.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { idParam, OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "./loaders.ts";
import { officeProjectSlug, useProjectParam, type projectListQueryOptions } from "./projects.ts";
import { meQueryOptions } from "./session.ts";

/** What an editor's form is opened with: the saved item (null for a new one), its project and that project's time zone. */
export interface EditorFormProps<T> {
  item: T | null;
  slug: string;
  me: User;
  zone: string;
}

/** A kind's query options, from its feature's api (each under its own key), and the form that edits it. */
interface EditorRouteProps<T extends { projectSlug: string }, KItem extends QueryKey, KList extends QueryKey, KProject extends QueryKey> {
  itemQuery: (id: number) => UseSuspenseQueryOptions<T, Error, T, KItem>;
  projectsQuery: () => UseSuspenseQueryOptions<Project[], Error, Project[], KList>;
  projectQuery: (slug: string) => UseSuspenseQueryOptions<Project, Error, Project, KProject>;
  form: (p: EditorFormProps<T>) => ReactNode;
}

/**
 * The route of an editor of published work (updates, photo stories): `:id` opens the saved item
 * in its own project, no id opens a new one in the project the site office has chosen. A new
 * editor is drawn for each id, so nothing of one item's draft carries over to another.
 */
export function PublishingEditorRoute<T extends { projectSlug: string }, KItem extends QueryKey, KList extends QueryKey, KProject extends QueryKey>(p: EditorRouteProps<T, KItem, KList, KProject>) {
  const id = idParam(useParams().id);
  return id > 0 ? <SavedItemEditor key={id} id={id} {...p} /> : <NewItemEditor {...p} />;
}

function SavedItemEditor<T extends { projectSlug: string }, KItem extends QueryKey, KList extends QueryKey, KProject extends QueryKey>({ id, itemQuery, projectQuery, form }: EditorRouteProps<T, KItem, KList, KProject> & { id: number }) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const item = useSuspenseQuery(itemQuery(id)).data;
  const project = useSuspenseQuery(projectQuery(item.projectSlug)).data;
  if (!me) return null;
  return form({ item, slug: item.projectSlug, me, zone: project.timeZone });
}

function NewItemEditor<T extends { projectSlug: string }, KItem extends QueryKey, KList extends QueryKey, KProject extends QueryKey>({ projectsQuery, projectQuery, form }: EditorRouteProps<T, KItem, KList, KProject>) {
  const me = useSuspenseQuery(meQueryOptions()).data;
  const { slug } = useProjectParam(useSuspenseQuery(projectsQuery()).data);
  // The project's own clock is shown once it has loaded; until then, the house default.
  const project = useQuery(projectQuery(slug));
  if (!me || !slug) return null;
  return form({ item: null, slug, me, zone: project.data?.timeZone ?? "Europe/London" });
}

/**
 * The editor route's loader: for staff, the saved item (`:id`) and so its project, or for a new
 * one the project the site office has chosen; then whatever `prime` reads of that project.
 */
export function publishingEditorLoader<T extends { projectSlug: string }, KItem extends QueryKey>(
  itemQuery: (id: number) => UseSuspenseQueryOptions<T, Error, T, KItem>,
  projectsQuery: () => ReturnType<typeof projectListQueryOptions>,
  prime: (qc: QueryClient, slug: string) => Promise<unknown>,
): RouteLoader {
  return (qc) =>
    ({ params, request }) =>
      primeWhenAllowed(qc, OFFICE_ROLES, async () => {
        const id = idParam(params.id);
        const slug = id > 0 ? (await qc.ensureQueryData(itemQuery(id))).projectSlug : await officeProjectSlug(qc, projectsQuery(), new URL(request.url).searchParams);
        if (slug) await prime(qc, slug);
      });
}
