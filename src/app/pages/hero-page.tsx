import { useSuspenseQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import type { MediaItem, MediaPicture, PictureVariant, VariantFormat } from "#shared/schemas/media.ts";
import { pageFromParams, UrlPager } from "../../components/ui/pager.tsx";
import { ProjectPicker } from "../../components/ui/project-picker.tsx";
import { PageHeader } from "../../components/ui/sheet.tsx";
import { canReview, LIBRARY_PAGE_SIZE, mediaListQueryOptions, type LibraryFilters } from "../../features/media/api.ts";
import { heroQueryOptions, projectsQueryOptions } from "../../features/projects/api.ts";
import { HeroPicker } from "../../features/projects/components/hero-picker.tsx";
import { OFFICE_ROLES, primeWhenAllowed, type RouteLoader } from "../../lib/loaders.ts";
import { officeProjectSlug, useProjectParam } from "../../lib/projects.ts";
import { meQueryOptions } from "../../lib/session.ts";

/*
 * Site office › Media › Hero photograph (decision 055): the media library's cleared photos, and
 * the projects module's choice of one of them. Composed here, as features do not import each other.
 */

const cleared = (page: number): LibraryFilters => ({ sensitivity: "cleared", page });

/** A library item as the `<picture>` every page renders. */
function pictureOfItem(item: MediaItem): MediaPicture {
  const sources: Record<VariantFormat, PictureVariant[]> = { avif: [], webp: [], jpeg: [] };
  for (const v of [...item.variants].sort((a, b) => a.width - b.width)) sources[v.format].push({ url: v.url, width: v.width, height: v.height, format: v.format });
  const { id, width, height, altText, caption, credit, placeholder, dominantColor, takenAt, focal, isIllustration } = item;
  return { id, width, height, altText, caption, credit, placeholder, dominantColor, takenAt, focal, isIllustration, sources };
}

export const heroPageLoader: RouteLoader = (qc) => async ({ request }) =>
  primeWhenAllowed(qc, OFFICE_ROLES, async () => {
    const search = new URL(request.url).searchParams;
    const slug = await officeProjectSlug(qc, projectsQueryOptions(), search);
    if (slug) await Promise.all([qc.ensureQueryData(heroQueryOptions(slug)), qc.ensureQueryData(mediaListQueryOptions(slug, cleared(pageFromParams(search))))]);
  });

function Picker({ slug, canChoose }: { slug: string; canChoose: boolean }) {
  const [params] = useSearchParams();
  const hero = useSuspenseQuery(heroQueryOptions(slug)).data;
  const list = useSuspenseQuery(mediaListQueryOptions(slug, cleared(pageFromParams(params)))).data;
  // Only a ready photo with alt text and no flag may be chosen (the server says so too).
  const choices = list.items.filter((i) => i.status === "ready" && i.altText && !i.flaggedForReview).map(pictureOfItem);
  return (
    <>
      <HeroPicker key={slug} slug={slug} hero={hero} choices={choices} canChoose={canChoose} />
      <UrlPager total={list.total} pageSize={LIBRARY_PAGE_SIZE} label="Pages of cleared photos" />
    </>
  );
}

export function HeroPhotoPage() {
  const projects = useSuspenseQuery(projectsQueryOptions()).data;
  const me = useSuspenseQuery(meQueryOptions()).data;
  const { slug, choices, setSlug } = useProjectParam(projects);
  return (
    <>
      <PageHeader
        sheet="Site office · Media"
        title="Hero photograph"
        description="The photograph the project page and the home page open with: one cleared photo, cropped around the point you choose."
      />
      <ProjectPicker choices={choices} slug={slug} setSlug={setSlug} className="mb-4 w-full sm:w-72" />
      {slug ? <Picker slug={slug} canChoose={canReview(me)} /> : null}
    </>
  );
}
