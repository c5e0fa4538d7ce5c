import type { Knex } from "knex";
import type { Role } from "#shared/schemas/common.ts";
import type { ReviewContentKind, ReviewVerdict } from "#shared/schemas/review-links.ts";
import { date, dateOrNull, num, numOrNull, oneOf, oneOfOrNull, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

/**
 * Review links (`review_links`) and what their reviewers did with them (`review_link_events`),
 * named here only. A link points at one revision of a post or story by kind and id: no foreign
 * key reaches the content's table, so deleting the content leaves the link, which the service
 * then refuses (410).
 */

export interface ReviewLinkRecord {
  id: number;
  projectId: number;
  contentKind: ReviewContentKind;
  contentId: number;
  revisionNumber: number;
  reviewerName: string;
  reviewerEmail: string;
  reviewerOrganisation: string | null;
  nonce: string;
  expiresAt: Date;
  revokedAt: Date | null;
  createdBy: number | null;
  createdByRole: Extract<Role, "admin" | "lead" | "marketing">;
  createdAt: Date;
}

export interface ReviewLinkEventRecord {
  reviewLinkId: number;
  kind: "opened" | "answered";
  verdict: ReviewVerdict | null;
  comment: string | null;
  revisionNumber: number;
  ip: string | null;
  userAgent: string | null;
  at: Date;
}


const toLinkEvent = readRow<ReviewLinkEventRecord>({
  reviewLinkId: num(), kind: oneOf<ReviewLinkEventRecord["kind"]>(), verdict: oneOfOrNull<ReviewVerdict>(), comment: textOrNull(), revisionNumber: num(), ip: textOrNull(),
  userAgent: textOrNull(), at: date(),
});

const toLink = readRow<ReviewLinkRecord>({
  id: num(), projectId: num(), contentKind: oneOf<ReviewContentKind>(), contentId: num(), revisionNumber: num(), reviewerName: text(), reviewerEmail: text(),
  reviewerOrganisation: textOrNull(), nonce: text(), expiresAt: date(), revokedAt: dateOrNull(), createdBy: numOrNull(),
  createdByRole: oneOf<ReviewLinkRecord["createdByRole"]>(), createdAt: date(),
});

export async function insertReviewLink(q: Q, link: Omit<ReviewLinkRecord, "id" | "revokedAt">): Promise<number> {
  const [id] = await q("review_links").insert({
    project_id: link.projectId,
    content_kind: link.contentKind,
    content_id: link.contentId,
    revision_number: link.revisionNumber,
    reviewer_name: link.reviewerName,
    reviewer_email: link.reviewerEmail,
    reviewer_organisation: link.reviewerOrganisation,
    nonce: link.nonce,
    expires_at: link.expiresAt,
    created_by: link.createdBy,
    created_by_role: link.createdByRole,
    created_at: link.createdAt,
  });
  return Number(id);
}

export async function findReviewLink(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<ReviewLinkRecord | null> {
  const query = q("review_links").where({ id }).first();
  const r = opts.forUpdate ? await query.forUpdate() : await query;
  return r ? toLink(r) : null;
}

/** The links of one post or story, newest first. */
export async function listReviewLinks(q: Q, kind: ReviewContentKind, contentId: number): Promise<ReviewLinkRecord[]> {
  const rows = await q("review_links").where({ content_kind: kind, content_id: contentId }).orderBy("id", "desc");
  return rows.map(toLink);
}

export async function markRevoked(q: Q, id: number, by: number | null, at: Date): Promise<void> {
  await q("review_links").where({ id }).whereNull("revoked_at").update({ revoked_at: at, revoked_by: by });
}

export async function insertReviewLinkEvent(q: Q, e: ReviewLinkEventRecord): Promise<void> {
  await q("review_link_events").insert({
    review_link_id: e.reviewLinkId,
    kind: e.kind,
    verdict: e.verdict,
    comment: e.comment,
    revision_number: e.revisionNumber,
    ip: e.ip?.slice(0, 64) ?? null,
    user_agent: e.userAgent?.slice(0, 300) ?? null,
    at: e.at,
  });
}

/** The events of these links, newest first, by link. */
export async function eventsOfLinks(q: Q, ids: readonly number[]): Promise<Map<number, ReviewLinkEventRecord[]>> {
  const out = new Map<number, ReviewLinkEventRecord[]>();
  if (!ids.length) return out;
  const rows = await q("review_link_events").whereIn("review_link_id", ids).orderBy([{ column: "at", order: "desc" }, { column: "id", order: "desc" }]);
  for (const r of rows) {
    const id = Number(r.review_link_id);
    const list = out.get(id) ?? [];
    list.push(toLinkEvent(r));
    out.set(id, list);
  }
  return out;
}
