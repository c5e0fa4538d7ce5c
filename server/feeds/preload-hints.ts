import { existsSync, readFileSync } from "node:fs";
import type { MediaPicture } from "#shared/schemas/media.ts";
import { HERO_SIZES, HOME_HERO_SIZES, POST_COVER_SIZES, srcSetOf } from "#shared/domain/picture-sizes.ts";
import { xmlAttr as escapeHtml } from "./xml.ts";

/**
 * Preload hints for the HTML shell (docs/decisions/049-compressed-answers-and-preload-hints.md).
 * Without them a phone fetches the entry script, then the page's chunk, then its data, then
 * its first photo, one after another; with them the page's chunk and the post's cover start
 * with the HTML.
 */

/** One chunk of Vite's build manifest (dist/.vite/manifest.json), the fields read here. */
interface ManifestChunk {
  file: string;
  imports?: string[];
  css?: string[];
  isEntry?: boolean;
}
export type ViteManifest = Record<string, ManifestChunk>;

/** Which source module each public page's route loads (src/app/router.tsx). */
const ROUTE_MODULES: ReadonlyArray<[RegExp, string]> = [
  [/^\/projects\/[a-z0-9-]+\/?$/, "src/app/pages/project-home-page.tsx"],
  [/^\/projects\/[a-z0-9-]+\/(updates|gallery)(\/[a-z0-9-]+)?\/?$/, "src/features/public-site/routes.tsx"],
  [/^\/projects\/[a-z0-9-]+\/search\/?$/, "src/features/public-site/search-routes.tsx"],
  [/^\/projects\/[a-z0-9-]+\/stories\/[a-z0-9-]+\/?$/, "src/features/public-site/routes.tsx"],
  [/^\/projects\/[a-z0-9-]+\/timeline\/?$/, "src/app/pages/timeline-page.tsx"],
  [/^\/projects\/[a-z0-9-]+\/facility\/?$/, "src/features/public-site/facility-routes.tsx"],
];

export function readManifest(clientDir: string): ViteManifest | null {
  const file = `${clientDir}/.vite/manifest.json`;
  if (!existsSync(file)) return null;
  try {
    return JSON.parse(readFileSync(file, "utf8")) as ViteManifest;
  } catch {
    return null;
  }
}

/** Every chunk `key` pulls in statically, itself first. */
function closure(manifest: ViteManifest, key: string, seen = new Set<string>()): Set<string> {
  if (seen.has(key) || !manifest[key]) return seen;
  seen.add(key);
  for (const k of manifest[key].imports ?? []) closure(manifest, k, seen);
  return seen;
}

/**
 * `<link rel="modulepreload">` (and stylesheet preloads) for the chunks of the page at `path`
 * that the entry script does not already bring; "" for a page the table does not know.
 */
export function moduleHintsFor(manifest: ViteManifest | null, path: string): string {
  if (!manifest) return "";
  const source = ROUTE_MODULES.find(([re]) => re.test(path))?.[1];
  if (!source || !manifest[source]) return "";
  const entry = Object.keys(manifest).find((k) => manifest[k]!.isEntry);
  const loaded = entry ? closure(manifest, entry) : new Set<string>();
  const tags: string[] = [];
  for (const key of closure(manifest, source)) {
    if (loaded.has(key)) continue;
    const chunk = manifest[key]!;
    tags.push(`<link rel="modulepreload" crossorigin href="/${escapeHtml(chunk.file)}">`);
    for (const css of chunk.css ?? []) tags.push(`<link rel="preload" as="style" href="/${escapeHtml(css)}">`);
  }
  return tags.join("\n    ");
}

/**
 * The preload of a post's cover (the page's largest paint): the best format the browser
 * takes, with the same `srcset` and `sizes` as the page's <Picture>, so the one fetch serves both.
 */
export function coverHint(cover: Pick<MediaPicture, "sources"> | null, sizes: string = POST_COVER_SIZES): string {
  if (!cover) return "";
  const format = cover.sources.avif.length ? "avif" : cover.sources.webp.length ? "webp" : cover.sources.jpeg.length ? "jpeg" : null;
  if (!format) return "";
  return `<link rel="preload" as="image" type="image/${format}" imagesrcset="${escapeHtml(srcSetOf(cover.sources[format]))}" imagesizes="${escapeHtml(sizes)}" fetchpriority="high">`;
}

/** The preload of a project's chosen hero (decision 055): the project page's largest paint. */
export const heroHint = (hero: Pick<MediaPicture, "sources"> | null): string => coverHint(hero, HERO_SIZES);

/** The preload of the home page's one build's picture, drawn beside its figures. */
export const homeHeroHint = (hero: Pick<MediaPicture, "sources"> | null): string => coverHint(hero, HOME_HERO_SIZES);

/** Puts hint tags at the end of the shell's head. */
export function injectHints(shell: string, hints: string): string {
  return hints ? shell.replace(/<\/head>/i, () => `    ${hints}\n  </head>`) : shell;
}
