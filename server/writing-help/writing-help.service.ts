import { addDays } from "#shared/domain/calendar.ts";
import { ALT_FROM_CAPTION_MARK, suggestDraft, type MilestoneMoveEvent, type PhotoCandidate, type RecordMoveEvent } from "#shared/domain/draft-suggestion.ts";
import { recordReaderOf } from "#shared/domain/record-audience.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaItem } from "#shared/schemas/media.ts";
import type { PostCreateInput } from "#shared/schemas/posts.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { RichTextDoc, RichTextNode } from "#shared/schemas/rich-text.ts";
import type { DraftSuggestion } from "#shared/schemas/writing-help.ts";
import { AppError } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { DecisionsService } from "../decisions/decisions.service.ts";
import { facilityItems } from "../digests/digests.facility.ts";
import { decisionLines, describeDecisionMove, describeRiskMove, riskLines } from "../digests/digests.record.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import { dateInZone, type ProjectsService } from "../projects/projects.service.ts";
import type { RisksService } from "../risks/risks.service.ts";

/**
 * When an audience has never had a published update, the suggestion looks back this many days:
 * a month is what a monthly update covers, and the longest gap the demo's updates leave.
 */
export const FIRST_UPDATE_LOOKBACK_DAYS = 30;
/** Most photos read from the library for one window (two pages of 100); the suggestion offers a few of them. */
const MAX_PHOTO_PAGES = 2;

export interface WritingHelpDeps {
  projects: ProjectsService;
  programme: Pick<ProgrammeService, "list" | "moves">;
  facility: Pick<FacilityService, "figuresAt">;
  risks: Pick<RisksService, "movesIn">;
  decisions: Pick<DecisionsService, "movesIn">;
  media: Pick<MediaService, "list">;
  posts: Pick<PostsService, "publishedBetween" | "create">;
}

const VIEWER_OF = { public: "public", investor: "investor", internal: "staff" } as const;

/**
 * Help for the people who write (issue #15): the draft suggested from what happened since the
 * last published update of an audience. It owns no table: it reads the programme, the facility,
 * the record, the library and the posts through their services, and writes a draft through the
 * posts service, so the usual workflow decides everything after that.
 */
export function createWritingHelpService(deps: WritingHelpDeps) {
  const { projects, programme, facility, risks, decisions, media, posts } = deps;

  /** The window: from the last published update of this audience (or a month back) to now. */
  async function windowOf(project: Project, audience: Audience) {
    const until = projects.now();
    const published = await posts.publishedBetween(project.id, [audience], new Date(0), until);
    const last = published.reduce<Date | null>((a, p) => (a === null || p.publishedAt > a ? p.publishedAt : a), null);
    const lastDay = dateInZone(until, project.timeZone);
    const firstDay = last ? dateInZone(last, project.timeZone) : addDays(lastDay, -FIRST_UPDATE_LOOKBACK_DAYS);
    return { since: last, until, firstDay, lastDay };
  }

  async function milestoneEvents(project: Project, audience: Audience, firstDay: string, lastDay: string): Promise<MilestoneMoveEvent[]> {
    const viewer = VIEWER_OF[audience];
    const [listed, moves] = await Promise.all([programme.list(project.slug, {}, viewer), programme.moves(project.slug, { from: firstDay, to: lastDay }, viewer)]);
    const byId = new Map(listed.map((m) => [m.id, m]));
    return moves.flatMap((row) => {
      const m = byId.get(row.milestoneId);
      if (!m) return []; // removed since: its removal is not progress to write about
      return row.moves.flatMap((move) =>
        move.kind === "completed" || move.kind === "later" || move.kind === "earlier"
          ? [{ milestoneId: m.id, name: m.name, audience: m.audience, area: m.area, system: m.system, kind: move.kind, days: move.days ?? null, from: move.from, to: move.to }]
          : [],
      );
    });
  }

  /**
   * The record's risks and decisions that moved, for investor and internal updates only, read as
   * the writer may read them: marketing reads investor-audience items, whatever the update's audience.
   */
  async function recordEvents(project: Project, audience: Audience, actor: Actor, from: Date, to: Date): Promise<RecordMoveEvent[]> {
    if (audience === "public") return [];
    const readsInternal = audience === "internal" && recordReaderOf(actor.user!.role).audiences.includes("internal");
    const viewer = readsInternal ? "staff" : "investor";
    const [riskMoves, decisionMoves] = await Promise.all([risks.movesIn(project.id, from, to, viewer), decisions.movesIn(project.id, from, to, viewer)]);
    const lastDay = dateInZone(to, project.timeZone);
    return [
      // Worded as the digests word them: one line per item, dates in words, days left or overdue.
      ...riskLines(riskMoves).map((r): RecordMoveEvent => ({ kind: "risk", audience: r.audience, title: `${r.reference} ${r.title}`, detail: describeRiskMove(r), at: lastDay })),
      ...decisionLines(decisionMoves).map((d): RecordMoveEvent => ({ kind: "decision", audience: d.audience, title: `${d.reference} ${d.title}`, detail: describeDecisionMove(d), at: d.kind === "decided" ? d.decidedOn : lastDay })),
    ];
  }

  /** Cleared, processed photos taken in the window, each with its smallest JPEG as the thumbnail. */
  async function photosIn(project: Project, firstDay: string, lastDay: string): Promise<PhotoCandidate[]> {
    const items: MediaItem[] = [];
    for (let page = 1; page <= MAX_PHOTO_PAGES; page += 1) {
      const answer = await media.list({ project: project.slug, takenFrom: firstDay, takenTo: lastDay, sensitivity: "cleared", status: "ready", page, pageSize: 100 });
      items.push(...answer.items);
      if (page * answer.pageSize >= answer.total) break;
    }
    return items.map((p) => ({
      mediaId: p.id,
      caption: p.caption,
      altText: p.altText,
      takenAt: p.takenAt,
      cleared: p.sensitivity === "cleared" && p.status === "ready",
      tags: { areas: p.tags.areas, systems: p.tags.systems, milestones: p.tags.milestones },
      thumbUrl: p.variants.filter((v) => v.format === "jpeg").sort((a, b) => a.width - b.width)[0]?.url ?? null,
    }));
  }

  async function suggestionFor(project: Project, audience: Audience, actor: Actor): Promise<DraftSuggestion | null> {
    const w = await windowOf(project, audience);
    const from = w.since ?? new Date(w.until.getTime() - FIRST_UPDATE_LOOKBACK_DAYS * 86_400_000);
    const [milestones, facilityMoves, record, photos] = await Promise.all([
      milestoneEvents(project, audience, w.firstDay, w.lastDay),
      // The record at the window's start is as it stood at the end of the day before (as digests read it).
      Promise.all([facility.figuresAt(project.id, addDays(w.firstDay, -1), VIEWER_OF[audience]), facility.figuresAt(project.id, w.lastDay, VIEWER_OF[audience])]).then(([a, b]) => facilityItems(a, b)),
      recordEvents(project, audience, actor, from, w.until),
      photosIn(project, w.firstDay, w.lastDay),
    ]);
    return suggestDraft({
      audience,
      since: w.since?.toISOString() ?? null,
      until: w.until.toISOString(),
      firstDay: w.firstDay,
      lastDay: w.lastDay,
      milestones,
      facility: facilityMoves,
      record,
      photos,
    });
  }

  return {
    /** The suggestion for an update to `audience` now, or null when nothing it may read of moved. */
    async suggestion(slug: string, audience: Audience, actor: Actor): Promise<{ suggestion: DraftSuggestion | null }> {
      const project = await projects.get(slug);
      return { suggestion: await suggestionFor(project, audience, actor) };
    },

    /**
     * A draft made from the suggestion as it stands now, through the posts service (a draft, its
     * author the caller): nothing is published or sent. With nothing to suggest, a blank draft
     * would be no help: 409, and the writer starts blank as before.
     */
    async createDraft(slug: string, audience: Audience, actor: Actor): Promise<{ id: number }> {
      const project = await projects.get(slug);
      const s = await suggestionFor(project, audience, actor);
      if (!s) throw new AppError("nothing_to_suggest", "Nothing has happened since the last published update for this audience: start a blank update instead.", 409);
      const input: PostCreateInput = { title: s.title, summary: "", body: draftBody(s), audience, milestoneIds: s.milestoneIds, coverMediaId: s.photos[0]?.mediaId ?? null };
      const created = await posts.create(slug, input, actor);
      return { id: created.id };
    },
  };
}

const text = (t: string): RichTextNode => ({ type: "text", text: t });
const paragraph = (...content: RichTextNode[]): RichTextNode => ({ type: "paragraph", content });

/**
 * The draft's body: a heading per group of moves, each move a line of a list, the milestone
 * status blocks the editor offers for each milestone that moved, then the suggested photos with
 * their captions, the alt text suggested from the caption and marked for checking.
 */
export function draftBody(s: DraftSuggestion): RichTextDoc {
  const content: RichTextNode[] = [];
  // One status block per milestone, under the first group that tells of it.
  const blocked = new Set<number>();
  for (const g of s.groups) {
    content.push({ type: "heading", attrs: { level: 2 }, content: [text(g.heading)] });
    content.push({ type: "bulletList", content: g.moves.map((m) => ({ type: "listItem", content: [paragraph({ type: "text", text: m.title, marks: [{ type: "bold" }] }, text(`: ${m.detail}`))] })) });
    for (const m of g.moves) {
      if (m.milestoneId === null || blocked.has(m.milestoneId)) continue;
      blocked.add(m.milestoneId);
      content.push({ type: "milestone", attrs: { milestoneId: m.milestoneId } });
    }
  }
  if (s.photos.length > 0) {
    content.push({ type: "heading", attrs: { level: 2 }, content: [text("Photographs")] });
    for (const p of s.photos) {
      // The image node keeps at most 500 characters of alt text and 1000 of caption.
      const alt = p.altCandidate.slice(0, 500) || null;
      content.push({ type: "image", attrs: { mediaId: p.mediaId, alt, caption: p.caption?.slice(0, 1000) ?? null, title: alt ? ALT_FROM_CAPTION_MARK : null } });
    }
  }
  return { type: "doc", content };
}
export type WritingHelpService = ReturnType<typeof createWritingHelpService>;
