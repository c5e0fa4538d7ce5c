import { once } from "node:events";
import type { Readable } from "node:stream";
import archiver, { type Archiver } from "archiver";
import Papa from "papaparse";
import { slugFromTitle } from "#shared/domain/publishing-workflow.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { Gallery, GalleryQuery } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PressUsageTerms, PressUsageTermsInput } from "#shared/schemas/press-kits.ts";
import { PRESS_KIT_MANIFEST_COLUMNS, type PressKitInput } from "#shared/schemas/writing-help.ts";
import type { AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import { pressFileExtension, type PressPhoto, type PressReader } from "../media/media.press-kit.ts";
import type { ProjectPressTerms } from "../projects/projects.press-terms.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { Viewer } from "#shared/domain/audience.ts";

/** What a press kit reads of other modules: photos and their files (media), a story's photos (stories), the usage terms (projects). */
export interface PressKitsDeps {
  projects: Pick<ProjectsService, "get" | "now">;
  pressTerms: Pick<ProjectPressTerms, "get" | "set" | "termsOf">;
  media: {
    pressPhotos(ids: readonly number[], reader: PressReader): Promise<Map<number, PressPhoto>>;
    openPressFile(photo: PressPhoto, size: string): Promise<Readable | null>;
    gallery(slug: string, audiences: Audience[], f: GalleryQuery): Promise<Gallery>;
  };
  stories: {
    photosOf(projectId: number, story: { id: number } | { slug: string; viewer: Viewer }): Promise<{ id: number; slug: string; title: string; mediaIds: number[] } | null>;
  };
  audit: Pick<AuditService, "record">;
}

/** A kit ready to stream: nothing is read from storage until `open()`, so a HEAD request costs no files. */
export interface PressKitDownload {
  fileName: string;
  /** Photos planned (each is checked again just before its file is written). */
  planned: number;
  /** The zip, built as it is read: one photo's file open at a time, waiting while the reader is slow. */
  open(): Readable;
  /** Stops the build (the caller went away): the open file is closed and no further one opened. */
  abort(): void;
}

type ManifestRow = Record<(typeof PRESS_KIT_MANIFEST_COLUMNS)[number], string>;

interface KitPlan {
  project: Project;
  ids: number[];
  reader: PressReader;
  size: string;
  /** What the kit is of, in words, and a part of the zip's file name. */
  source: { words: string; slug: string | null };
  usageTerms: string | null;
}

/** The calendar date a photo was taken (its camera's own date), or null. */
const dateOf = (p: Pick<PressPhoto, "takenAt">) => (p.takenAt && /^\d{4}-\d{2}-\d{2}/.test(p.takenAt) ? p.takenAt.slice(0, 10) : null);

/** A file name from the caption (or alt text) and the date: lower-case ASCII words, unique within the kit. */
function fileNameFor(photo: PressPhoto, size: string, used: Set<string>): string {
  const words = (photo.caption ?? "").trim() || (photo.altText ?? "").trim();
  const slug = words ? slugFromTitle(words).slice(0, 60).replace(/-+$/, "") : "";
  // slugFromTitle falls back to "update" for text with no latin letters or digits.
  const base = `${dateOf(photo) ?? "undated"}-${slug && !(slug === "update" && !/update/i.test(words)) ? slug : `photo-${photo.id}`}`;
  const ext = pressFileExtension(photo, size);
  let name = `${base}.${ext}`;
  for (let n = 2; used.has(name); n += 1) name = `${base}-${n}.${ext}`;
  used.add(name);
  return name;
}

function manifestRow(file: string, p: PressPhoto): ManifestRow {
  return { file, caption: p.caption ?? "", credit: p.credit ?? "", date: dateOf(p) ?? "", area: p.areas.join("; "), alt: p.altText ?? "" };
}

/** The CSV manifest; formulae are escaped, since captions are typed by people and opened in spreadsheets. */
function manifestCsv(rows: ManifestRow[]): string {
  return `${Papa.unparse({ fields: [...PRESS_KIT_MANIFEST_COLUMNS], data: rows.map((r) => PRESS_KIT_MANIFEST_COLUMNS.map((c) => r[c])) }, { escapeFormulae: true, newline: "\r\n" })}\r\n`;
}

const SIZE_WORDS: Record<string, string> = { original: "the originals, without their metadata", 640: "640 px wide", 1200: "1200 px wide", 2400: "2400 px wide" };

/** The plain-text manifest: what the kit is, its usage terms, each photograph, the credits and (for staff) what was left out. */
function manifestText(plan: KitPlan, rows: ManifestRow[], withheld: string[], at: Date): string {
  const lines = [
    `${plan.project.name}: press photographs`,
    `${plan.source.words}. ${rows.length} photograph${rows.length === 1 ? "" : "s"}, ${SIZE_WORDS[plan.size] ?? plan.size}, made ${at.toISOString().slice(0, 10)}.`,
    "",
    `Usage terms: ${plan.usageTerms ?? `none set; ask ${plan.project.operatorName} before publishing these photographs.`}`,
    "",
    "Photographs",
  ];
  rows.forEach((r, i) => {
    lines.push(`${i + 1}. ${r.file}`);
    for (const [label, value] of [["Caption", r.caption], ["Credit", r.credit], ["Taken", r.date], ["Area", r.area], ["Alt text", r.alt]] as const) if (value) lines.push(`   ${label}: ${value}`);
  });
  const credits = new Map<string, number>();
  for (const r of rows) {
    const credit = r.credit || plan.project.operatorName;
    credits.set(credit, (credits.get(credit) ?? 0) + 1);
  }
  lines.push("", "Credits");
  for (const [credit, n] of credits) lines.push(`- ${credit} (${n} photograph${n === 1 ? "" : "s"})`);
  if (withheld.length) {
    lines.push("", "Withheld (checked when the kit was made)");
    for (const w of withheld) lines.push(`- ${w}`);
  }
  return `${lines.join("\r\n")}\r\n`;
}

/** Appends one entry and waits until the archive has written it: one source open at a time, whatever the count. */
async function appendWhole(archive: Archiver, source: Readable | string, data: archiver.EntryData & { store?: boolean }): Promise<void> {
  const written = once(archive, "entry");
  archive.append(source, data);
  await written;
}

/**
 * Press kits (issue #15 item 4, docs/decisions/062-press-kits.md): a selection of photos, a story
 * or a gallery filter as one zip, streamed as it is built, with a CSV and a plain-text manifest.
 * Each photo is checked for the reader just before its file is written; one that may no longer
 * go in is left out (and, in a staff kit, listed as withheld).
 */
export function createPressKitsService(deps: PressKitsDeps) {
  const { projects, pressTerms, media, stories, audit } = deps;

  function build(plan: KitPlan): PressKitDownload {
    const archive = archiver("zip", { zlib: { level: 6 } });
    let aborted = false;
    let current: Readable | null = null;
    const at = projects.now();
    const stamp = at.toISOString().slice(0, 10);

    async function write(): Promise<void> {
      const used = new Set<string>(["manifest.csv", "manifest.txt"]);
      const rows: ManifestRow[] = [];
      const withheld: string[] = [];
      for (const id of plan.ids) {
        if (aborted) return;
        // Asked again now, not when the kit was planned: a photo restricted meanwhile stays out.
        const photo = (await media.pressPhotos([id], plan.reader)).get(id);
        const reason = !photo || photo.projectId !== plan.project.id ? "it is no longer in the library" : photo.withheld;
        if (reason || !photo) {
          withheld.push(`photo #${id}: ${reason}`);
          continue;
        }
        current = await media.openPressFile(photo, plan.size);
        if (!current) {
          withheld.push(`photo #${id}: its file is missing from storage`);
          continue;
        }
        const name = fileNameFor(photo, plan.size, used);
        const taken = photo.takenAt ? new Date(`${photo.takenAt.slice(0, 19)}Z`) : null;
        // JPEG and PNG are compressed already: stored as they are, which costs no CPU.
        await appendWhole(archive, current, { name, store: true, date: taken && !Number.isNaN(taken.getTime()) ? taken : at });
        current = null;
        rows.push(manifestRow(name, photo));
      }
      if (aborted) return;
      // A visitor's manifest names nothing it left out: only a staff kit lists what was withheld.
      const listed = plan.reader === "staff" ? withheld : [];
      await appendWhole(archive, manifestCsv(rows), { name: "manifest.csv", date: at });
      await appendWhole(archive, manifestText(plan, rows, listed, at), { name: "manifest.txt", date: at });
      await archive.finalize();
    }

    return {
      fileName: `${plan.project.slug}-press-kit${plan.source.slug ? `-${plan.source.slug}` : ""}-${stamp}.zip`,
      planned: plan.ids.length,
      open() {
        write().catch((err: unknown) => {
          current?.destroy();
          archive.destroy(err instanceof Error ? err : new Error(String(err)));
        });
        return archive;
      },
      abort() {
        aborted = true;
        current?.destroy();
        archive.abort();
      },
    };
  }

  /** The photos of a gallery filter as the public gallery shows them (cleared, in published public content). */
  async function galleryIds(slug: string, f: GalleryQuery): Promise<number[]> {
    return (await media.gallery(slug, ["public"], f)).items.map((p) => p.id);
  }

  const sourceSlug = (words: string | undefined) => (words ? slugFromTitle(words).slice(0, 40).replace(/-+$/, "") : null);

  return {
    /**
     * A staff kit (admin, lead, marketing): chosen photos of the project's library, a story's
     * photos (any state) or a gallery filter, at a derivative width or as metadata-stripped
     * originals. Photos of another project or none at all are refused (404); when none of them
     * may go in a kit, 422.
     */
    async staffKit(slug: string, input: PressKitInput, actor: Actor): Promise<PressKitDownload> {
      const project = await projects.get(slug);
      let ids: number[];
      let source: KitPlan["source"];
      if (input.mediaIds) {
        ids = [...new Set(input.mediaIds)];
        const found = await media.pressPhotos(ids, "staff");
        const missing = ids.filter((id) => found.get(id)?.projectId !== project.id);
        if (missing.length) {
          const list = missing.map((id) => `#${id}`).join(", ");
          throw new AppError("not_found", `No photo ${list} in ${project.name}'s library.`, 404, { mediaIds: `photo ${list} is not in this project's library` });
        }
        source = { words: "Chosen in the media library", slug: null };
      } else if (input.storyId !== undefined) {
        const story = await stories.photosOf(project.id, { id: input.storyId });
        if (!story) throw notFound("That story");
        ids = story.mediaIds;
        source = { words: `The photographs of the story “${story.title}”`, slug: story.slug };
      } else {
        const f = input.filter ?? {};
        ids = await galleryIds(slug, { area: f.area, system: f.system as GalleryQuery["system"], month: f.month });
        const words = [f.area, f.system, f.month].filter(Boolean).join(", ");
        source = { words: words ? `The public gallery's photographs of ${words}` : "The public gallery's photographs", slug: sourceSlug(f.area) };
      }
      const now = await media.pressPhotos(ids, "staff");
      if (![...now.values()].some((p) => !p.withheld)) {
        throw new AppError("nothing_to_download", ids.length ? "None of these photos may go in a press kit: each is restricted, not yet cleared, flagged or still processing." : "There are no photos here to put in a press kit.", 422);
      }
      const usageTerms = await pressTerms.termsOf(project.id);
      await audit.record({ action: "press_kit_downloaded", actor, target: { type: "project", id: project.id, label: project.name }, detail: { photos: ids.length, size: input.size, source: source.words } });
      return build({ project, ids, reader: "staff", size: input.size, source, usageTerms });
    },

    /**
     * A visitor's kit: the public gallery (or one area of it) or a published public story, cleared
     * photos in published public content only, with the project's usage terms. 404 when there is
     * nothing to download (an unknown area or story tells nothing more).
     */
    async publicKit(slug: string, query: { area?: string; story?: string; size: "1200" | "2400" }): Promise<PressKitDownload> {
      if (query.story !== undefined && query.area !== undefined) throw new AppError("validation", "Choose an area or a story, not both.", 400, { story: "give an area or a story, not both" });
      const project = await projects.get(slug);
      let ids: number[];
      let source: KitPlan["source"];
      if (query.story !== undefined) {
        const story = await stories.photosOf(project.id, { slug: query.story, viewer: "public" });
        if (!story) throw notFound("That story");
        ids = story.mediaIds;
        source = { words: `The photographs of the story “${story.title}”`, slug: story.slug };
      } else {
        ids = await galleryIds(slug, { area: query.area });
        source = { words: query.area ? `The gallery's photographs of ${query.area}` : "The gallery's photographs", slug: sourceSlug(query.area) };
      }
      const now = await media.pressPhotos(ids, "visitor");
      const allowed = ids.filter((id) => now.get(id)?.projectId === project.id && !now.get(id)?.withheld);
      if (!allowed.length) throw new AppError("not_found", "There are no photographs to download here.", 404);
      const usageTerms = await pressTerms.termsOf(project.id);
      return build({ project, ids: allowed, reader: "visitor", size: query.size, source, usageTerms });
    },

    usageTerms: (slug: string): Promise<PressUsageTerms> => pressTerms.get(slug),
    setUsageTerms: (slug: string, input: PressUsageTermsInput, actor: Actor): Promise<PressUsageTerms> => pressTerms.set(slug, input, actor),
  };
}
export type PressKitsService = ReturnType<typeof createPressKitsService>;
