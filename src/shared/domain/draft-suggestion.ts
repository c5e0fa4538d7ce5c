/**
 * The draft Plumbline suggests when a lead or marketing user starts an update: what happened
 * since the last published update of an audience, grouped and worded, with the cleared photos
 * of that window that show it, best first (issue #15, decision 061). Pure: the window's events,
 * photos, last publication and audience in; a suggestion, or null when nothing happened, out.
 *
 * The caller reads each module as the audience already; this function holds the rule again on
 * its own input, so a hidden milestone (its name, its id, its area) or a record item the
 * audience may not read never reaches a suggestion whatever the caller passed.
 */
import type { Audience } from "../schemas/common.ts";
import type { DraftSuggestion, SuggestedPhoto, SuggestionMove, SuggestionMoveKind } from "../schemas/writing-help.ts";
import { audiencesFor, type Viewer } from "./audience.ts";
import { formatLongDate } from "./locale-dates.ts";

/** A milestone's news in the window: completed, or its forecast moved (days, positive = later). */
export interface MilestoneMoveEvent {
  milestoneId: number;
  name: string;
  /** The milestone's own audience: who may read of it. */
  audience: Audience;
  area: string | null;
  system: string;
  kind: "completed" | "later" | "earlier";
  /** Calendar days the forecast moved (positive = later); null for a completion. */
  days: number | null;
  from: string | null;
  to: string | null;
}

/** A facility move as the digests word it (server/digests/digests.facility.ts), with its topics. */
export interface FacilityMoveEvent {
  item:
    | { kind: "block_forecast_moved"; name: string; from: string; to: string; days: number }
    | { kind: "block_ready"; name: string; on: string | null }
    | { kind: "system_label"; name: string; from: string; to: string; design: string; reachedDesign: boolean }
    | { kind: "units_commissioned"; name: string; units: string[]; now: string | null };
  /** Areas: the block names it concerns; systems: the programme's systems it reports under. */
  topics: { areas: string[]; systems: string[] };
}

/** A risk or decision of the investor record that moved, in words, with the record's audience. */
export interface RecordMoveEvent {
  kind: "risk" | "decision";
  /** The record item's audience: investor or internal; nothing of the record is public. */
  audience: "investor" | "internal";
  /** "R-004 Chiller delivery" */
  title: string;
  /** "new, rated high", "decided: approved" */
  detail: string;
  /** Calendar day or instant. */
  at: string;
}

/** A photo of the library taken in the window, with its review state and tags. */
export interface PhotoCandidate {
  mediaId: number;
  caption: string | null;
  altText: string | null;
  /** Camera local time, `YYYY-MM-DDTHH:mm:ss…`; null when unknown. */
  takenAt: string | null;
  /** Reviewed and cleared by a lead, and processed: publishable to any audience. */
  cleared: boolean;
  tags: { areas: string[]; systems: string[]; milestones: number[] };
  thumbUrl: string | null;
}

export interface DraftSuggestionInput {
  audience: Audience;
  /** Instant of the last published update of this audience, or null when there is none. */
  since: string | null;
  /** Instant the suggestion is made. */
  until: string;
  /** The window as calendar days in the project's zone (photos are kept in camera local time). */
  firstDay: string;
  lastDay: string;
  milestones: readonly MilestoneMoveEvent[];
  facility: readonly FacilityMoveEvent[];
  record: readonly RecordMoveEvent[];
  photos: readonly PhotoCandidate[];
}

/**
 * Set as an image node's `title` (which the site never renders) when a suggested draft took its
 * alt text from the caption: the editor shows it until the writer has checked the words.
 */
export const ALT_FROM_CAPTION_MARK = "Alt text suggested from the caption: check it";

/** Most photos a suggestion offers: enough to choose from, few enough to check. */
export const MAX_SUGGESTED_PHOTOS = 8;
/** Longest suggested title (the post title allows 200). */
export const MAX_SUGGESTED_TITLE = 120;

const VIEWER_OF: Record<Audience, Viewer> = { public: "public", investor: "investor", internal: "staff" };
const RECORD_AUDIENCES: Record<Audience, readonly RecordMoveEvent["audience"][]> = { public: [], investor: ["investor"], internal: ["investor", "internal"] };

/** Groups in the order the body tells them. */
const GROUPS: ReadonlyArray<{ heading: string; kinds: readonly SuggestionMoveKind[] }> = [
  { heading: "Milestones completed", kinds: ["milestone_completed"] },
  { heading: "Plant commissioned", kinds: ["unit_commissioned", "system_label_reached"] },
  { heading: "Capacity blocks", kinds: ["block_ready_moved"] },
  { heading: "Forecasts moved", kinds: ["forecast_moved"] },
  { heading: "Risks and issues", kinds: ["risk"] },
  { heading: "Decisions", kinds: ["decision"] },
];

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
const daysWord = (days: number) => `${plural(Math.abs(days), "day")} ${days >= 0 ? "later" : "earlier"}`;

/** A day as the update's readers read it: "15 January 2027" (the draft becomes the update's text). */
const dayWords = (date: string) => formatLongDate(date.slice(0, 10));

function milestoneMove(m: MilestoneMoveEvent, lastDay: string): SuggestionMove {
  if (m.kind === "completed") return { kind: "milestone_completed", title: m.name, detail: m.to ? `completed on ${dayWords(m.to)}` : "completed", at: m.to ?? lastDay, milestoneId: m.milestoneId, days: null };
  const days = m.days ?? 0;
  return { kind: "forecast_moved", title: m.name, detail: `forecast moved ${daysWord(days)}${m.to ? `, to ${dayWords(m.to)}` : ""}`, at: lastDay, milestoneId: m.milestoneId, days };
}

function facilityMove({ item }: FacilityMoveEvent, lastDay: string): SuggestionMove {
  const base = { title: item.name, milestoneId: null, days: null, at: lastDay };
  switch (item.kind) {
    case "block_ready":
      return { ...base, kind: "block_ready_moved", detail: "ready for service", at: item.on ?? lastDay };
    case "block_forecast_moved":
      return { ...base, kind: "block_ready_moved", detail: `ready date moved ${daysWord(item.days)}, to ${dayWords(item.to)}`, days: item.days };
    case "system_label":
      return { ...base, kind: "system_label_reached", detail: item.reachedDesign ? `reached ${item.to}, its design redundancy` : `now ${item.to} (was ${item.from}; design ${item.design})` };
    case "units_commissioned":
      return { ...base, kind: "unit_commissioned", detail: `${plural(item.units.length, "unit")} commissioned (${item.units.join(", ")})${item.now ? `; now ${item.now}` : ""}` };
  }
}

/** A name without its closing detail in brackets: "Hall 2A ready for service (48 racks, 480 kW)" → "Hall 2A ready for service". */
const shortName = (name: string) => name.replace(/\s*\([^)]*\)\s*$/, "") || name;
/** A milestone named for the event that completes it ("… energised", "… topped out", "… ready for service"): its name says it is done. */
const NAMES_AN_EVENT = /(?:\w+ed|\bset|\bout|\bup|\bready for service|\blive)$/i;

/** The phrase a move gives the title, shortest words first. */
function titlePhrase(m: SuggestionMove): string {
  switch (m.kind) {
    case "milestone_completed": {
      const name = shortName(m.title);
      return NAMES_AN_EVENT.test(name) ? name : `${name} complete`;
    }
    case "forecast_moved":
      return `${shortName(m.title)} forecast ${daysWord(m.days ?? 0)}`;
    case "unit_commissioned":
      return `${m.title}: ${m.detail.split(" (")[0]!}`;
    case "system_label_reached":
      // "reached N+1, its design redundancy" → "reached N+1"; "now N (was …)" → "now N".
      return `${m.title} ${m.detail.split(/,| \(/)[0]!}`;
    case "block_ready_moved":
      return m.days === null ? `${m.title} ready for service` : `${m.title} ready for service ${daysWord(m.days)}`;
    default:
      return m.title;
  }
}

/**
 * What leads a title, most newsworthy first: work finished, then when space is ready, then plant
 * brought into service, then forecasts. A system's redundancy is title news only when it reaches its
 * design level ("now short by 5" is a line of the body, not a headline); the record leads only
 * when nothing else moved.
 */
const TITLE_ORDER: readonly SuggestionMoveKind[] = ["milestone_completed", "block_ready_moved", "unit_commissioned", "system_label_reached", "forecast_moved"];
const titleWorthy = (m: SuggestionMove) => m.kind !== "system_label_reached" || m.detail.startsWith("reached");

/**
 * The two most newsworthy moves, one per subject (a system commissioned and relabelled is named
 * once), as many as read well, then how many more, e.g. "Hall 2A ready for service 21 days later,
 * Supply fans: 1 unit commissioned and 6 more".
 */
function suggestTitle(groups: DraftSuggestion["groups"]): string {
  const moves = groups.flatMap((g) => g.moves);
  const progress = TITLE_ORDER.flatMap((kind) => moves.filter((m) => m.kind === kind && titleWorthy(m)));
  const candidates = progress.length ? progress : moves;
  const phrases: string[] = [];
  const named = new Set<string>();
  for (const m of candidates) {
    if (phrases.length === 2) break;
    if (named.has(m.title)) continue;
    const phrase = titlePhrase(m);
    if (phrases.length > 0 && [...phrases, phrase].join(", ").length > MAX_SUGGESTED_TITLE - 20) break;
    phrases.push(phrase);
    named.add(m.title);
  }
  let title = phrases.join(", ");
  if (title.length > MAX_SUGGESTED_TITLE - 20) title = `${title.slice(0, MAX_SUGGESTED_TITLE - 21).trimEnd()}…`;
  if (moves.length > phrases.length) title += ` and ${moves.length - phrases.length} more`;
  return title.charAt(0).toUpperCase() + title.slice(1);
}

/**
 * The cleared photos taken in the window that show what moved, best first: the more moved
 * milestones, areas and systems a photo is tagged with, the better; then the newer. A photo
 * tagged with nothing that moved (or only with what the audience may not see) is not offered.
 */
function suggestPhotos(input: DraftSuggestionInput, visible: readonly MilestoneMoveEvent[], facility: readonly FacilityMoveEvent[]): SuggestedPhoto[] {
  const milestoneNames = new Map(visible.map((m) => [m.milestoneId, m.name]));
  const areas = new Set([...visible.flatMap((m) => (m.area ? [m.area] : [])), ...facility.flatMap((f) => f.topics.areas)]);
  const systems = new Set([...visible.map((m) => m.system), ...facility.flatMap((f) => f.topics.systems)]);
  const ranked: Array<SuggestedPhoto & { score: number }> = [];
  for (const p of input.photos) {
    if (!p.cleared || p.takenAt === null) continue;
    const day = p.takenAt.slice(0, 10);
    if (day < input.firstDay || day > input.lastDay) continue;
    const because = [
      ...p.tags.milestones.flatMap((id) => (milestoneNames.has(id) ? [milestoneNames.get(id)!] : [])),
      ...p.tags.areas.filter((a) => areas.has(a)),
      ...p.tags.systems.filter((s) => systems.has(s)),
    ];
    const unique = [...new Set(because)];
    if (unique.length === 0) continue;
    const caption = p.caption?.trim() || null;
    ranked.push({ mediaId: p.mediaId, caption, altCandidate: caption ?? p.altText?.trim() ?? "", takenAt: p.takenAt, because: unique, thumbUrl: p.thumbUrl, score: unique.length });
  }
  ranked.sort((a, b) => b.score - a.score || (b.takenAt ?? "").localeCompare(a.takenAt ?? "") || a.mediaId - b.mediaId);
  return ranked.slice(0, MAX_SUGGESTED_PHOTOS).map(({ score: _score, ...photo }) => photo);
}

/**
 * The suggestion for an update to `input.audience`, or null when nothing it may read of moved
 * since its last published update. Milestones the audience may not read are left out entirely
 * (name, id, area); the record (risks, decisions) is for investor and internal updates only,
 * and an investor update tells only investor-audience items of it.
 */
export function suggestDraft(input: DraftSuggestionInput): DraftSuggestion | null {
  const readable = audiencesFor(VIEWER_OF[input.audience]);
  // A milestone completed in the window is told as completed, not also as a forecast that moved.
  const completed = new Set(input.milestones.filter((m) => m.kind === "completed").map((m) => m.milestoneId));
  const visible = input.milestones.filter((m) => readable.includes(m.audience) && (m.kind === "completed" || !completed.has(m.milestoneId)));
  const record = input.record.filter((r) => RECORD_AUDIENCES[input.audience].includes(r.audience));
  const moves: SuggestionMove[] = [
    ...visible.map((m) => milestoneMove(m, input.lastDay)),
    ...input.facility.map((f) => facilityMove(f, input.lastDay)),
    ...record.map((r): SuggestionMove => ({ kind: r.kind, title: r.title, detail: r.detail, at: r.at, milestoneId: null, days: null })),
  ];
  if (moves.length === 0) return null;
  const groups = GROUPS.map((g) => ({
    heading: g.heading,
    // Bigger forecast moves first: they are the news; the rest keep the order they happened in.
    moves: moves.filter((m) => g.kinds.includes(m.kind)).sort((a, b) => Math.abs(b.days ?? 0) - Math.abs(a.days ?? 0) || a.at.localeCompare(b.at)),
  })).filter((g) => g.moves.length > 0);
  return {
    audience: input.audience,
    since: input.since,
    until: input.until,
    title: suggestTitle(groups),
    groups,
    milestoneIds: [...new Set(visible.map((m) => m.milestoneId))],
    photos: suggestPhotos(input, visible, input.facility),
  };
}
