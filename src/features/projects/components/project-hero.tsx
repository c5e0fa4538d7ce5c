import { HERO_SIZES } from "#shared/domain/picture-sizes.ts";
import type { ReactNode } from "react";
import { useHero } from "../api.ts";
import { HERO_FRAMES, HeroImage, IllustrationMark } from "./hero-image.tsx";

/**
 * The project page's hero: the photograph staff chose, cropped around its focal point
 * (decision 055); `fallback` (the latest cover) when none is chosen or it can no longer be shown.
 * While the answer is on its way the box holds the hero's ratio, so the page does not move.
 */
export function ProjectHero({ slug, fallback }: { slug: string; fallback: ReactNode }) {
  const hero = useHero(slug);
  if (hero.isPending) return <div className={`mt-6 border border-rule bg-rule ${HERO_FRAMES.project.className}`} aria-hidden="true" />;
  const picture = hero.data?.picture;
  if (!picture || !hero.data) return <>{fallback}</>;
  return (
    <figure className="mt-6" data-testid="project-hero">
      <HeroImage picture={picture} focus={hero.data.focus} frame="project" eager sizes={HERO_SIZES} />
      {picture.caption || picture.isIllustration ? (
        <figcaption className="mt-2 text-sm text-ink-soft">
          {picture.caption}
          {/* The crop can cut off the mark drawn on an illustration, so it is said here too. */}
          {picture.isIllustration ? <IllustrationMark /> : null}
        </figcaption>
      ) : null}
    </figure>
  );
}
