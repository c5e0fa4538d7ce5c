import type { Audience } from "#shared/schemas/common.ts";
import type { Frequency, Topics } from "#shared/schemas/subscribers.ts";
import { addDays } from "#shared/domain/calendar.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService, PublishedPostRecord } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { topicsAllow } from "../subscribers/subscribers.topics.ts";
import { createFacilityMovesCache, type DigestFacilitySource, type FacilityMovesCache } from "./digests.facility.ts";
import { createRecordMovesCache, emptyRecord, investorRoomUrl, type DigestRecordSource, type RecordMovesCache } from "./digests.record.ts";
import type { DigestDocument, DigestFigures } from "./digests.render.ts";
import { localDate } from "./digests.windows.ts";

/** Who a digest is written for: subscribers read as visitors or as investors, never as staff. */
export type DigestAudience = "public" | "investor";

/**
 * Investor-only pictures in a digest e-mail are signed links to the derivative that expire this
 * many days after the render (rounded up to a whole UTC day, so one run's renders share a URL).
 * The web copy, valid for a year, signs its pictures afresh whenever it is opened.
 */
export const MEDIA_LINK_TTL_DAYS = 30;
const DAY_MS = 24 * 60 * 60 * 1000;
/** Moves worth telling a reader about; progress ticks and audience changes are not news. */
const NEWS_MOVES = new Set(["removed", "restored", "completed", "reopened", "rebaselined", "later", "earlier"]);

/** `days` after `at`, rounded up to the next UTC midnight. */
export const linkExpiry = (at: Date, days: number) => new Date(Math.ceil((at.getTime() + days * DAY_MS) / DAY_MS) * DAY_MS);

const audiencesOf = (a: DigestAudience): Audience[] => (a === "investor" ? ["public", "investor"] : ["public"]);

/** Post tags → the shape `topicsAllow` reads. */
function postTopics(p: PublishedPostRecord) {
  return { areas: p.tags.filter((t) => t.kind === "area").map((t) => t.value), systems: p.tags.filter((t) => t.kind === "system").map((t) => t.value) };
}

/** The project as a digest names it (`projects.sender`). */
export type DigestProject = Awaited<ReturnType<ProjectsService["sender"]>>;

/** The figures of a reader's last digest: the baseline of "since your last digest". */
export type PreviousFigures = { percentComplete: number | null; forecastReady: string | null } | null;

export interface AssembleInput {
  project: DigestProject;
  frequency: Frequency;
  audience: DigestAudience;
  topics: Topics | null;
  windowStart: Date;
  windowEnd: Date;
  /** A preview or test of a period still in progress. */
  soFar?: boolean;
  previous: PreviousFigures;
  /** The post of an "as it happens" digest. */
  postId?: number | null;
  /** The run's facility and record moves, shared by its readers (`newRunCache`); a lone digest works its own out. */
  runCache?: DigestRunCache;
}

/** What a run works out once per (project, audience, window) and shares between its readers. */
export interface DigestRunCache {
  facility: FacilityMovesCache;
  record: RecordMovesCache;
}

export interface DigestAssemblerDeps {
  programme: Pick<ProgrammeService, "list" | "moves" | "health">;
  media: Pick<MediaService, "pictureFor" | "signedVariantUrl">;
  posts: Pick<PostsService, "publishedBetween" | "findPublished">;
  facility: DigestFacilitySource;
  /** The investor record (risks, decisions, budget changes, documents): its moves are investors' news. */
  record: DigestRecordSource;
  publicUrl: string;
  now: () => Date;
}

/** What goes into one reader's digest. */
export function createDigestAssembler(deps: DigestAssemblerDeps) {
  const { programme, media, posts, facility, record, publicUrl, now } = deps;

  /**
   * Each post's cover picture by post id, as an absolute URL for e-mail: a public post's is the
   * public derivative; an investor post's (in an investor digest only) a signed, expiring link, since
   * no mail client is signed in. A public digest never asks for an investor picture.
   */
  async function posterUrls(rows: PublishedPostRecord[], audience: DigestAudience): Promise<Map<number, { url: string; alt: string; mediaId: number }>> {
    const shown = rows.filter((p) => p.coverMediaId !== null && (p.audience === "public" || (p.audience === "investor" && audience === "investor")));
    const out = new Map<number, { url: string; alt: string; mediaId: number }>();
    if (shown.length === 0) return out;
    const pictures = await media.pictureFor(shown.map((p) => p.coverMediaId!));
    const expiresAt = linkExpiry(now(), MEDIA_LINK_TTL_DAYS);
    for (const post of shown) {
      const pic = pictures.get(post.coverMediaId!);
      const jpegs = pic?.sources.jpeg ?? [];
      const pick = jpegs.find((v) => v.width >= 600) ?? jpegs[jpegs.length - 1];
      if (!pic || !pick) continue;
      const path = post.audience === "public" ? pick.url : media.signedVariantUrl(pick.url, expiresAt);
      out.set(post.id, { url: new URL(path, publicUrl).toString(), alt: pic.altText ?? "", mediaId: post.coverMediaId! });
    }
    return out;
  }

  /** A cache for one run: each (audience, window) asks the facility and the record once, whoever reads it. */
  const newRunCache = (): DigestRunCache => ({ facility: createFacilityMovesCache(facility), record: createRecordMovesCache(record) });

  /**
   * What one reader's digest holds: posts published in the window that the audience and
   * topics allow, the programme's and the facility's moves in the window, for an investor the
   * record's (risks, decisions, approved changes, documents), milestones due in the next 30 days,
   * and the headline figures against those of the reader's last digest.
   */
  async function assemble(p: AssembleInput): Promise<DigestDocument> {
    const { project, audience, topics } = p;
    const allowed = audiencesOf(audience);
    let postRows: PublishedPostRecord[];
    if (p.frequency === "immediate") {
      const one = p.postId ? await posts.findPublished(p.postId) : null;
      postRows = one && one.projectId === project.id && allowed.includes(one.audience) ? [one] : [];
    } else {
      postRows = await posts.publishedBetween(project.id, allowed, p.windowStart, p.windowEnd);
    }
    postRows = postRows.filter((x) => allowed.includes(x.audience) && topicsAllow(topics, postTopics(x)));
    const pictures = await posterUrls(postRows, audience);
    const projectUrl = `${publicUrl}/projects/${project.slug}`;
    const roomUrl = investorRoomUrl(publicUrl, project.slug);
    const doc: DigestDocument = {
      project: { name: project.name, slug: project.slug, operatorName: project.operatorName, postalAddress: project.postalAddress, timeZone: project.timeZone },
      frequency: p.frequency,
      windowStart: p.windowStart,
      windowEnd: p.windowEnd,
      soFar: p.soFar ?? false,
      projectUrl,
      posts: postRows.map((x) => ({
        postId: x.id,
        title: x.title,
        summary: x.summary,
        url: `${projectUrl}/updates/${x.slug}`,
        publishedAt: x.publishedAt,
        image: pictures.get(x.id) ?? null,
      })),
      moves: [],
      facility: [],
      record: emptyRecord(roomUrl),
      dueSoon: [],
      figures: { percentComplete: null, forecastReady: null, previousPercent: null, previousForecast: null },
    };
    if (p.frequency === "immediate") return doc;

    // The programme reads as the digest's audience (a visitor or an investor), the viewer it names.
    // Removed milestones too: their removal is news to the readers who could see them.
    const listed = await programme.list(project.slug, { removed: "include" }, audience);
    const milestones = listed.filter((m) => m.removal === null);
    const byId = new Map(listed.map((m) => [m.id, m]));
    const within = (id: number) => {
      const m = byId.get(id);
      return m ? topicsAllow(topics, { areas: m.area ? [m.area] : [], systems: [m.system] }) : false;
    };
    const firstDay = localDate(p.windowStart, project.timeZone);
    const lastDay = localDate(new Date(p.windowEnd.getTime() - 1), project.timeZone);
    const moves = await programme.moves(project.slug, { from: firstDay, to: lastDay }, audience);
    doc.moves = moves
      .filter((row) => within(row.milestoneId))
      .flatMap((row) =>
        row.moves
          .filter((m) => NEWS_MOVES.has(m.kind))
          .map((m) => ({ milestoneName: row.milestoneName, milestoneId: row.milestoneId, kind: m.kind, days: m.days, from: m.from, to: m.to, ...(m.kind === "removed" || m.kind === "restored" ? { reason: m.notes.join("; ") } : {}) })),
      );
    // The facility's and the record's moves are the same for every reader of this audience and window: worked out once per run.
    const cache = p.runCache ?? newRunCache();
    const facilityMoves = await cache.facility(project.id, audience, firstDay, lastDay);
    doc.facility = facilityMoves.filter((x) => topicsAllow(topics, x.topics)).map((x) => x.item);
    // Nothing of the record is public. It is the project's record as a whole, so a reader's topics
    // (areas and systems of the programme) do not narrow it: a decision asked of investors reaches each of them.
    if (audience === "investor") doc.record = { ...(await cache.record(project.id, p.windowStart, p.windowEnd)), roomUrl };
    const today = localDate(p.windowEnd, project.timeZone);
    const horizon = addDays(today, 30);
    doc.dueSoon = milestones
      .filter((m) => m.status !== "complete" && within(m.id))
      .map((m) => ({ name: m.name, milestoneId: m.id, date: m.forecastFinish ?? m.baselineFinish, status: m.status }))
      .filter((m) => m.date >= today && m.date <= horizon)
      .sort((a, b) => a.date.localeCompare(b.date) || a.name.localeCompare(b.name));
    const health = await programme.health(project.slug, {}, audience);
    const figures: DigestFigures = {
      // The whole programme's figure, the same for every audience; none while the programme has no milestone.
      percentComplete: health.baselineCompletion !== null ? Math.round(health.percentComplete * 10) / 10 : null,
      forecastReady: health.forecastCompletion,
      previousPercent: p.previous?.percentComplete ?? null,
      previousForecast: p.previous?.forecastReady ?? null,
    };
    doc.figures = figures;
    return doc;
  }

  return { assemble, newRunCache };
}
export type DigestAssembler = ReturnType<typeof createDigestAssembler>;
