import mjml2html from "mjml";
import { DateTime } from "luxon";
import { formatLongDate } from "#shared/domain/locale-dates.ts";
import { digestPeriodTitle } from "#shared/domain/digest-period.ts";
import { INDICATIVE_CAUTION } from "#shared/domain/facility.ts";
import type { MoveKind } from "#shared/domain/programme-changes.ts";
import { WHOLE_PROGRAMME_NOTE } from "#shared/domain/programme-health.ts";
import { escapeHtml } from "../mail/mail.layout.ts";
import type { DigestFacilityItem } from "./digests.facility.ts";
import { itemClass, uniqueRefs, type DigestItemRef } from "./digests.items.ts";
import { recordCounts, recordHasNews, recordSections, type DigestRecord } from "./digests.record.ts";
import { ACCENT, INK } from "#shared/look.ts";

/** Personal links, filled in per delivery; everything else is shared by every reader of a content. */
export const PLACEHOLDERS = {
  webUrl: "{{webUrl}}",
  preferencesUrl: "{{preferencesUrl}}",
  unsubscribeUrl: "{{unsubscribeUrl}}",
} as const;
export type PersonalLinks = Record<keyof typeof PLACEHOLDERS, string>;

export interface DigestPostItem {
  title: string;
  summary: string;
  url: string;
  publishedAt: Date;
  image: { url: string; alt: string; mediaId?: number } | null;
  /** The post's id, so the archive can withhold it if it is withdrawn or narrowed later (decision 045). */
  postId?: number;
}

export interface DigestMoveItem {
  milestoneName: string;
  milestoneId?: number;
  kind: MoveKind;
  days?: number;
  from: string | null;
  to: string | null;
  /** Why a milestone was removed from (or put back into) the programme. */
  reason?: string;
}

export interface DigestDueItem {
  name: string;
  milestoneId?: number;
  date: string;
  status: string;
}

export interface DigestFigures {
  percentComplete: number | null;
  forecastReady: string | null;
  previousPercent: number | null;
  previousForecast: string | null;
}

export interface DigestDocument {
  project: { name: string; slug: string; operatorName: string; postalAddress: string | null; timeZone: string };
  frequency: "immediate" | "weekly" | "monthly";
  windowStart: Date;
  windowEnd: Date;
  /** The window stops at "now", inside a period still running (a preview or a test): its title says "so far". */
  soFar?: boolean;
  projectUrl: string;
  posts: DigestPostItem[];
  moves: DigestMoveItem[];
  /** What the facility did in the window: blocks' ready dates, readiness, redundancy, units commissioned. */
  facility: DigestFacilityItem[];
  /** What the investor record did in the window (investor digests only; none in the seeded history). */
  record?: DigestRecord;
  dueSoon: DigestDueItem[];
  figures: DigestFigures;
}

export interface RenderedDigest {
  subject: string;
  preheader: string;
  html: string;
  text: string;
}

/** Whether a digest has news: posts, programme, facility or record moves, or a changed headline figure. Due dates alone are not news. */
export function hasNews(d: DigestDocument): boolean {
  return d.posts.length > 0 || d.moves.length > 0 || d.facility.length > 0 || (d.record !== undefined && recordHasNews(d.record)) || figureDelta(d.figures).changed;
}

/** The change of the headline figures since the reader's last digest (percentage points; calendar days). */
export function figureDelta(f: DigestFigures): { percentPoints: number | null; forecastDays: number | null; changed: boolean } {
  const percentPoints = f.percentComplete !== null && f.previousPercent !== null ? Math.round((f.percentComplete - f.previousPercent) * 10) / 10 : null;
  const forecastDays =
    f.forecastReady && f.previousForecast ? Math.round(DateTime.fromISO(f.forecastReady, { zone: "UTC" }).diff(DateTime.fromISO(f.previousForecast, { zone: "UTC" }), "days").days) : null;
  return { percentPoints, forecastDays, changed: (percentPoints !== null && percentPoints !== 0) || (forecastDays !== null && forecastDays !== 0) };
}

const longDate = (iso: string) => formatLongDate(iso.slice(0, 10));

/** A move in plain words: "later by 9 days (12 March 2027 → 21 March 2027)". */
export function describeMove(m: DigestMoveItem): string {
  // Only a move of dates has a span: a removal or a return carries the states it moved between.
  const span = () => (m.from && m.to ? ` (${longDate(m.from)} → ${longDate(m.to)})` : m.to ? ` (${longDate(m.to)})` : "");
  switch (m.kind) {
    case "completed":
      return `completed${m.to ? ` on ${longDate(m.to)}` : ""}`;
    case "later":
      return `later by ${Math.abs(m.days ?? 0)} day${Math.abs(m.days ?? 0) === 1 ? "" : "s"}${span()}`;
    case "earlier":
      return `earlier by ${Math.abs(m.days ?? 0)} day${Math.abs(m.days ?? 0) === 1 ? "" : "s"}${span()}`;
    case "rebaselined":
      return `re-baselined${span()}`;
    case "removed":
      return `removed from the programme${m.reason ? ` (${m.reason})` : ""}; it no longer counts in the figures`;
    case "restored":
      return `put back into the programme${m.reason ? ` (${m.reason})` : ""}`;
    default:
      return `${String(m.kind).replace(/_/g, " ")}${span()}`;
  }
}

const unitNames = (units: readonly string[]) => (units.length <= 1 ? units.join("") : `${units.slice(0, -1).join(", ")} and ${units[units.length - 1]}`);

/**
 * A facility move in plain words, after the block's or system's name:
 * ": ready for service later by 9 days (…)", " now N+1, as designed (was N)".
 */
export function describeFacilityMove(m: DigestFacilityItem): string {
  switch (m.kind) {
    case "block_forecast_moved":
      return `: ready for service ${describeMove({ milestoneName: m.name, kind: m.days > 0 ? "later" : "earlier", days: m.days, from: m.from, to: m.to })}`;
    case "block_ready":
      return `: ready for service${m.on ? ` from ${longDate(m.on)}` : ""}`;
    case "system_label":
      return m.reachedDesign ? ` now ${m.to}, its design level (was ${m.from})` : ` now ${m.to} (was ${m.from}; design ${m.design})`;
    case "units_commissioned":
      return `: ${unitNames(m.units)} commissioned${m.now ? ` (now ${m.now})` : ""}`;
  }
}

/** Redundancy labels are engineering figures: a facility section showing one carries the caution. */
const showsEngineeringFigure = (items: readonly DigestFacilityItem[]) => items.some((m) => m.kind === "system_label" || (m.kind === "units_commissioned" && m.now !== null));

/** The days the window covers in the project's zone (its end is exclusive), named by `digestPeriodTitle`. */
export function periodLabel(d: Pick<DigestDocument, "frequency" | "windowStart" | "windowEnd" | "soFar" | "project">): string {
  const zone = d.project.timeZone;
  const firstDay = DateTime.fromJSDate(d.windowStart, { zone }).toISODate()!;
  const lastDay = DateTime.fromJSDate(new Date(d.windowEnd.getTime() - 1), { zone }).toISODate()!;
  return digestPeriodTitle({ frequency: d.frequency, firstDay, lastDay, soFar: d.soFar ?? false });
}

function figuresLines(f: DigestFigures): string[] {
  const delta = figureDelta(f);
  const lines: string[] = [];
  if (f.percentComplete !== null) {
    const change = delta.percentPoints === null ? "" : delta.percentPoints === 0 ? " (unchanged since your last digest)" : ` (${delta.percentPoints > 0 ? "+" : ""}${delta.percentPoints} points since your last digest)`;
    lines.push(`Complete: ${f.percentComplete.toFixed(1)}%${change}`);
  }
  if (f.forecastReady) {
    const d = delta.forecastDays;
    const change = d === null ? "" : d === 0 ? " (unchanged since your last digest)" : ` (${Math.abs(d)} day${Math.abs(d) === 1 ? "" : "s"} ${d > 0 ? "later" : "earlier"} than in your last digest)`;
    // The programme's last milestone, named as the pages name it: ready for service is each capacity block's own date.
    lines.push(`Forecast completion: ${longDate(f.forecastReady)}${change}`);
  }
  // The digest lists only its audience's milestones; its figures are the whole programme's.
  if (lines.length > 0) lines.push(WHOLE_PROGRAMME_NOTE);
  return lines;
}

function subjectOf(d: DigestDocument): string {
  if (d.frequency === "immediate" && d.posts[0]) return `${d.project.name}: ${d.posts[0].title}`;
  return `${d.project.name}: progress, ${periodLabel(d)}`;
}

function preheaderOf(d: DigestDocument): string {
  const parts: string[] = [];
  if (d.posts.length) parts.push(`${d.posts.length} update${d.posts.length === 1 ? "" : "s"}`);
  if (d.moves.length) parts.push(`${d.moves.length} programme change${d.moves.length === 1 ? "" : "s"}`);
  if (d.facility.length) parts.push(`${d.facility.length} facility change${d.facility.length === 1 ? "" : "s"}`);
  if (d.record) parts.push(...recordCounts(d.record));
  if (d.dueSoon.length) parts.push(`${d.dueSoon.length} milestone${d.dueSoon.length === 1 ? "" : "s"} due in the next 30 days`);
  const lead = d.frequency === "immediate" && d.posts[0] ? d.posts[0].summary || d.posts[0].title : parts.join(", ");
  return lead.slice(0, 140);
}

const e = escapeHtml;

/** The mjml attribute that marks an item for the archive (decision 045); nothing for an item without a reference. */
const cls = (ref: DigestItemRef | null) => (ref ? ` css-class="${itemClass(ref)}"` : "");
const milestoneRef = (id: number | undefined): DigestItemRef | null => (id === undefined ? null : { kind: "milestone", id });

/** Every item a digest tells of, by reference: stored with its rendering, read by the archive. */
export function itemRefsOf(d: DigestDocument): DigestItemRef[] {
  const refs: DigestItemRef[] = [];
  for (const p of d.posts) {
    if (p.postId !== undefined) refs.push({ kind: "post", id: p.postId });
    if (p.image?.mediaId !== undefined) refs.push({ kind: "picture", id: p.image.mediaId });
  }
  for (const m of [...d.moves, ...d.dueSoon]) if (m.milestoneId !== undefined) refs.push({ kind: "milestone", id: m.milestoneId });
  for (const f of d.facility) refs.push({ kind: "facility", name: f.name });
  if (d.record) for (const section of recordSections(d.record)) refs.push(...section.lines.map((l) => l.ref));
  return uniqueRefs(refs);
}

function footerText(d: DigestDocument): string {
  return [d.project.operatorName, d.project.postalAddress].filter(Boolean).join(" · ");
}

/**
 * Renders a digest once, with placeholders where the reader's own links go: a responsive
 * HTML part (MJML), a plain-text part, a subject and a preheader.
 */
export async function renderDigest(d: DigestDocument): Promise<RenderedDigest> {
  const subject = subjectOf(d);
  const preheader = preheaderOf(d);
  const figures = figuresLines(d.figures);
  const posts = d.posts
    .map(
      (p) => `
      <mj-section padding="0 0 8px 0"${cls(p.postId === undefined ? null : { kind: "post", id: p.postId })}><mj-column>
        ${p.image ? `<mj-image src="${e(p.image.url)}" alt="${e(p.image.alt)}" href="${e(p.url)}" padding="0 0 8px 0"${cls(p.image.mediaId === undefined ? null : { kind: "picture", id: p.image.mediaId })} />` : ""}
        <mj-text font-size="18px" font-weight="bold" padding="0 0 4px 0"><a href="${e(p.url)}" style="color:#1d1f24">${e(p.title)}</a></mj-text>
        ${p.summary ? `<mj-text padding="0 0 4px 0">${e(p.summary)}</mj-text>` : ""}
        <mj-text padding="0 0 12px 0" font-size="13px"><a href="${e(p.url)}" style="color:${INK}">Read the update</a></mj-text>
      </mj-column></mj-section>`,
    )
    .join("");
  const list = (title: string, items: Array<{ html: string; ref: DigestItemRef | null }>, note?: string, link?: { url: string; label: string }) =>
    items.length
      ? `<mj-section padding="0 0 8px 0"><mj-column><mj-text font-size="16px" font-weight="bold" padding="8px 0 4px 0">${e(title)}</mj-text>${items.map((i) => `<mj-text padding="2px 0"${cls(i.ref)}>${i.html}</mj-text>`).join("")}${link ? `<mj-text padding="6px 0 0 0" font-size="13px"><a href="${e(link.url)}" style="color:${INK}">${e(link.label)}</a></mj-text>` : ""}${note ? `<mj-text font-size="12px" color="#5a5e66" padding="6px 0 0 0">${e(note)}</mj-text>` : ""}</mj-column></mj-section>`
      : "";
  const record = d.record ? recordSections(d.record) : [];
  const moveItems = d.moves.map((m) => ({ html: `<strong>${e(m.milestoneName)}</strong>: ${e(describeMove(m))}`, ref: milestoneRef(m.milestoneId) }));
  const facilityItems = d.facility.map((m) => ({ html: `<strong>${e(m.name)}</strong>${e(describeFacilityMove(m))}`, ref: { kind: "facility" as const, name: m.name } }));
  const caution = showsEngineeringFigure(d.facility) ? INDICATIVE_CAUTION : undefined;
  const dueItems = d.dueSoon.map((m) => ({ html: `<strong>${e(m.name)}</strong>: due ${e(longDate(m.date))}`, ref: milestoneRef(m.milestoneId) }));
  const mj = `<mjml lang="en">
  <mj-head>
    <mj-title>${e(subject)}</mj-title>
    <mj-preview>${e(preheader)}</mj-preview>
    <mj-attributes><mj-all font-family="Helvetica, Arial, sans-serif" /><mj-text font-size="15px" line-height="1.5" color="#1d1f24" /></mj-attributes>
  </mj-head>
  <mj-body background-color="#f6f3ec" width="600px">
    <mj-section padding="12px 0 0 0"><mj-column><mj-text font-size="12px" color="#5a5e66" align="right" padding="0 12px"><a href="${PLACEHOLDERS.webUrl}" style="color:#5a5e66">View in the browser</a></mj-text></mj-column></mj-section>
    <mj-wrapper background-color="#fffdf8" border="1px solid #d9d3c4" padding="16px 12px">
      <mj-section border-bottom="3px solid ${ACCENT}" padding="0 0 8px 0"><mj-column>
        <mj-text font-size="20px" font-weight="bold" padding="0"><a href="${e(d.projectUrl)}" style="color:#1d1f24;text-decoration:none">${e(d.project.name)}</a></mj-text>
        <mj-text font-size="13px" color="#5a5e66" padding="0">${e(periodLabel(d))}</mj-text>
      </mj-column></mj-section>
      ${figures.length ? `<mj-section padding="8px 0"><mj-column>${figures.map((f) => `<mj-text padding="2px 0">${e(f)}</mj-text>`).join("")}</mj-column></mj-section>` : ""}
      ${posts}
      ${list("Programme changes", moveItems)}
      ${list("Facility changes", facilityItems, caution)}
      ${record.map((x) => list(x.title, x.lines.map((l) => ({ html: `<strong>${e(l.name)}</strong>${e(l.rest)}`, ref: l.ref })), undefined, x.link)).join("")}
      ${list("Due in the next 30 days", dueItems)}
    </mj-wrapper>
    <mj-section padding="12px"><mj-column>
      <mj-text font-size="12px" color="#5a5e66">${e(footerText(d))}</mj-text>
      <mj-text font-size="12px" color="#5a5e66"><a href="${PLACEHOLDERS.preferencesUrl}" style="color:#5a5e66">Change topics or frequency</a> · <a href="${PLACEHOLDERS.unsubscribeUrl}" style="color:#5a5e66">Unsubscribe</a></mj-text>
    </mj-column></mj-section>
  </mj-body>
</mjml>`;
  const out = await mjml2html(mj, { validationLevel: "strict" });
  if (out.errors.length) throw new Error(`digest template: ${out.errors.map((x) => x.formattedMessage).join("; ")}`);

  const text = [
    d.project.name,
    periodLabel(d),
    "",
    ...(figures.length ? [...figures, ""] : []),
    ...d.posts.flatMap((p) => [p.title, ...(p.summary ? [p.summary] : []), `Read the update: ${p.url}`, ""]),
    ...(d.moves.length ? ["Programme changes", ...d.moves.map((m) => `- ${m.milestoneName}: ${describeMove(m)}`), ""] : []),
    ...(d.facility.length ? ["Facility changes", ...d.facility.map((m) => `- ${m.name}${describeFacilityMove(m)}`), ...(caution ? [caution] : []), ""] : []),
    ...record.flatMap((x) => [x.title, ...x.lines.map((l) => `- ${l.name}${l.rest}`), ...(x.link ? [`${x.link.label}: ${x.link.url}`] : []), ""]),
    ...(d.dueSoon.length ? ["Due in the next 30 days", ...d.dueSoon.map((m) => `- ${m.name}: due ${longDate(m.date)}`), ""] : []),
    `View in the browser: ${PLACEHOLDERS.webUrl}`,
    "",
    "--",
    footerText(d),
    `Change topics or frequency: ${PLACEHOLDERS.preferencesUrl}`,
    `Unsubscribe: ${PLACEHOLDERS.unsubscribeUrl}`,
    "",
  ].join("\n");
  return { subject, preheader, html: out.html, text };
}

/** Puts one reader's links into a shared rendering: string replacement only, no template run. */
export function personalise(s: string, links: PersonalLinks): string {
  return s.replaceAll(PLACEHOLDERS.webUrl, links.webUrl).replaceAll(PLACEHOLDERS.preferencesUrl, links.preferencesUrl).replaceAll(PLACEHOLDERS.unsubscribeUrl, links.unsubscribeUrl);
}
