/**
 * Who may call what: one row per route, the expected status per caller. Later modules add
 * their rows here. Write routes are called with an empty body, so a caller who is let in
 * gets 400 (validation) and nothing is written; one who is not gets 401 or 403.
 *
 * Rows about real objects of each audience take their path from `MatrixIds`, resolved from
 * the seeded demo (and a few objects made through the API) before the matrix runs: an
 * unknown id only proves the 404 path, a real internal milestone proves the audience check.
 * Every GET a visitor may call has a HEAD twin that must answer the same status.
 */
export type Caller = "admin" | "lead" | "marketing" | "investor" | "anonymous";

/** Real objects of each audience in the demo project. */
export interface MatrixIds {
  internalMilestone: number;
  investorMilestone: number;
  publicMilestone: number;
  /** A photo nobody has reviewed yet, and the file name of one of its derivatives. */
  unreviewedPhoto: number;
  unreviewedPhotoFile: string;
  /** A cleared photo shown in published public content, and one of its derivatives. */
  clearedPhoto: number;
  clearedPhotoFile: string;
  investorPost: number;
  investorPostSlug: string;
  publicPost: number;
  publicPostSlug: string;
  postInReview: number;
  postInReviewSlug: string;
  draftStory: number;
  draftStorySlug: string;
  /** A subscriber who is not the demo investor (their own digest settings are their record). */
  otherSubscriber: number;
  enquiry: number;
  digestRun: number;
  /** A project of the matrix's own facility (made through the API), with blocks, systems, units and features of each audience. */
  facilitySlug: string;
  internalBlock: number;
  investorBlock: number;
  publicBlock: number;
  internalSystem: number;
  publicSystem: number;
  internalUnit: number;
  investorUnit: number;
  publicUnit: number;
  internalFeature: number;
  /** The demo site plan's staff-only area (the contractors' compound). */
  internalSiteArea: number;
  publicFeature: number;
  /** A project of the matrix's own risks register and decisions (made through the API): one of each audience. */
  recordSlug: string;
  investorRisk: number;
  internalRisk: number;
  investorDecision: number;
  internalDecision: number;
  /** A project of the matrix's own document library (made through the API): an investor document, an internal one, one limited to an organisation the demo investor is not in. */
  documentsSlug: string;
  investorDocument: number;
  internalDocument: number;
  otherOrganisationDocument: number;
  /** Budget changes of the demo project: one of each audience. */
  investorChange: number;
  internalChange: number;
  /** A project of the matrix's own monthly reports (made through the API): an issued investor report, a draft, an issued internal report. */
  reportsSlug: string;
  issuedReport: number;
  draftReport: number;
  internalReport: number;
  /** A published public story (made through the API): a step it has already passed is refused, and nothing changes. */
  publishedStory: number;
  publishedStorySlug: string;
  /** A draft update of the matrix's own (made through the API): restoring its first revision changes no one else's. */
  draftPost: number;
  /** A message in the local mail sink. */
  outboxMessage: number;
  /** A digest the demo investor received, in their archive. */
  investorDigest: number;
  /** Objects each caller deletes for itself (one set a caller, investor-audience where there is an audience), so every deleting row meets a real object whoever runs first. */
  own: Record<Caller, OwnObjects>;
}

export interface OwnObjects {
  subscriber: number;
  block: number;
  system: number;
  unit: number;
  feature: number;
  siteArea: number;
  risk: number;
  /** A risk that gains a mitigation (and so is on record); `risk` is deleted untouched. */
  riskWithAction: number;
  mitigation: number;
  change: number;
  document: number;
  reviewLink: number;
}

export interface MatrixRow {
  method: "get" | "head" | "post" | "put" | "patch" | "delete";
  path: string | ((ids: MatrixIds, caller: Caller) => string);
  body?: unknown;
  expect: Record<Caller, number>;
  /**
   * How a visitor's answer may be cached. `shared`: the same for every caller, so public
   * caching with an ETag is allowed; `per-caller`: the same URL answers differently by
   * session (Vary: Cookie, never stored publicly). Default: per-caller under /api, shared
   * elsewhere (pages, feeds, files).
   */
  cache?: "shared" | "per-caller";
  /** A content-addressed file: a signed-in reader's own browser may keep it (`private, …, immutable`). */
  immutable?: boolean;
}

export const pathOf = (row: MatrixRow, ids: MatrixIds, caller: Caller = "admin"): string => (typeof row.path === "function" ? row.path(ids, caller) : row.path);

const all = (status: number): Record<Caller, number> => ({ admin: status, lead: status, marketing: status, investor: status, anonymous: status });
const adminOnly = (ok: number): Record<Caller, number> => ({ admin: ok, lead: 403, marketing: 403, investor: 403, anonymous: 401 });
const staffOnly = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: 403, anonymous: 401 });
const signedIn = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: ok, anonymous: 401 });
const investorOnly = (ok: number): Record<Caller, number> => ({ admin: 403, lead: 403, marketing: 403, investor: ok, anonymous: 401 });
/** A link token of the right shape whose signature is wrong. */
const BAD_LINK = `${"a".repeat(20)}.${"a".repeat(43)}`;
const writers = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: 403, investor: 403, anonymous: 401 });
/** Monthly reports: leads and admins (`staff`), investors (`investor`); marketing 403, visitors 401. */
const reportReaders = (staff: number, investor: number): Record<Caller, number> => ({ admin: staff, lead: staff, marketing: 403, investor, anonymous: 401 });

const DEMO_PROGRAMME = "/api/projects/aldermere-phase-2";

/** Media sensitivity decisions: project leads and administrators. */
const mediaReviewers = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: 403, investor: 403, anonymous: 401 });

/** Staff see it; investors and visitors are told it does not exist. */
const staffSeeOthersNotFound = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: 404, anonymous: 404 });
/** Staff and investors see it; visitors are told it does not exist. */
const investorAudience = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: ok, investor: ok, anonymous: 404 });
const DEMO_SLUG = "aldermere-phase-2";

/** Real objects of each audience (see MatrixIds): the audience rules, not just the 404 path. */
const REAL_OBJECT_ROWS: MatrixRow[] = [
  // Every route that names an object is called with a real one too (the test "has a row with a
  // real object for every route that names one" holds it). Deleting rows meet each caller's own object.
  { method: "delete", path: (ids, c) => `/api/subscribers/${ids.own[c].subscriber}`, expect: staffOnly(200) },
  { method: "delete", path: (ids, c) => `/api/facility/units/${ids.own[c].unit}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/facility/systems/${ids.own[c].system}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/facility/blocks/${ids.own[c].block}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/facility/features/${ids.own[c].feature}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/site-areas/${ids.own[c].siteArea}`, expect: writers(204) },
  { method: "patch", path: (ids, c) => `/api/mitigations/${ids.own[c].mitigation}`, body: {}, expect: writers(400) },
  { method: "delete", path: (ids, c) => `/api/mitigations/${ids.own[c].mitigation}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/risks/${ids.own[c].risk}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/budget-changes/${ids.own[c].change}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/documents/${ids.own[c].document}`, expect: writers(204) },
  { method: "delete", path: (ids, c) => `/api/review-links/${ids.own[c].reviewLink}`, expect: staffOnly(204) },
  { method: "get", path: (ids) => `/api/outbox/${ids.outboxMessage}`, expect: adminOnly(200) },
  { method: "get", path: (ids) => `/api/outbox/${ids.outboxMessage}/raw`, expect: adminOnly(200) },
  { method: "get", path: (ids) => `/api/me/digests/${ids.investorDigest}`, expect: investorOnly(200) },
  { method: "post", path: (ids) => `/api/media/${ids.unreviewedPhoto}/review`, body: {}, expect: mediaReviewers(400) },
  // A ready photo has nothing to retry; a finished run nothing to pause or resume; a step already passed is refused.
  { method: "post", path: (ids) => `/api/media/${ids.clearedPhoto}/retry`, expect: staffOnly(409) },
  { method: "post", path: (ids) => `/api/digests/runs/${ids.digestRun}/pause`, expect: staffOnly(409) },
  { method: "post", path: (ids) => `/api/digests/runs/${ids.digestRun}/resume`, expect: staffOnly(409) },
  { method: "get", path: (ids) => `/api/posts/${ids.postInReview}/revisions/1/diff`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/posts/${ids.draftPost}/revisions/1/restore`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/posts/${ids.postInReview}/submit`, expect: staffOnly(409) },
  { method: "post", path: (ids) => `/api/posts/${ids.publicPost}/approve`, expect: writers(409) },
  { method: "post", path: (ids) => `/api/posts/${ids.publicPost}/publish`, expect: writers(409) },
  { method: "post", path: (ids) => `/api/posts/${ids.postInReview}/withdraw`, expect: writers(409) },
  { method: "patch", path: (ids) => `/api/stories/${ids.draftStory}`, body: {}, expect: staffOnly(400) },
  { method: "get", path: (ids) => `/api/stories/${ids.draftStory}/history`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/stories/${ids.draftStory}/revisions/1/diff`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/stories/${ids.draftStory}/revisions/1/restore`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/stories/${ids.publishedStory}/submit`, expect: staffOnly(409) },
  { method: "post", path: (ids) => `/api/stories/${ids.publishedStory}/approve`, expect: writers(409) },
  { method: "post", path: (ids) => `/api/stories/${ids.draftStory}/return`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/stories/${ids.publishedStory}/publish`, expect: writers(409) },
  { method: "post", path: (ids) => `/api/stories/${ids.draftStory}/schedule`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/stories/${ids.draftStory}/withdraw`, expect: writers(409) },
  // Programme: an internal milestone exists for staff only; an investor one for investors too.
  { method: "get", path: (ids) => `/api/milestones/${ids.internalMilestone}/events`, expect: staffSeeOthersNotFound(200) },
  { method: "get", path: (ids) => `/api/milestones/${ids.internalMilestone}/drivers`, expect: staffSeeOthersNotFound(200) },
  { method: "patch", path: (ids) => `/api/milestones/${ids.internalMilestone}`, body: {}, expect: writers(400) },
  { method: "get", path: (ids) => `/api/milestones/${ids.investorMilestone}/events`, expect: investorAudience(200) },
  { method: "get", path: (ids) => `/api/milestones/${ids.publicMilestone}/events`, expect: all(200) },
  { method: "get", path: (ids) => `/api/milestones/${ids.publicMilestone}/drivers`, expect: all(200) },
  // Media: an unreviewed photo is staff's alone, its files included; a cleared one in public content is everyone's.
  { method: "get", path: (ids) => `/api/media/${ids.unreviewedPhoto}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/media/${ids.unreviewedPhoto}/original`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/media/v/${ids.unreviewedPhotoFile}`, expect: staffSeeOthersNotFound(200), cache: "per-caller", immutable: true },
  { method: "patch", path: (ids) => `/api/media/${ids.unreviewedPhoto}`, body: { sensitivity: "cleared", nonsense: true }, expect: { admin: 400, lead: 400, marketing: 400, investor: 403, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/media/${ids.clearedPhoto}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/media/v/${ids.clearedPhotoFile}`, expect: all(200), cache: "shared", immutable: true },
  // Press kits (decision 062): the public zip holds the demo gallery's cleared photos; a draft story is no visitor's kit, whoever asks.
  { method: "post", path: `/api/projects/${DEMO_SLUG}/press-kit`, body: {}, expect: staffOnly(400) },
  { method: "post", path: `/api/projects/${DEMO_SLUG}/press-kit`, body: { mediaIds: [999999999] }, expect: staffOnly(404) },
  { method: "get", path: `/projects/${DEMO_SLUG}/press-kit.zip`, expect: all(200), cache: "per-caller" },
  { method: "get", path: (ids) => `/projects/${DEMO_SLUG}/press-kit.zip?story=${ids.draftStorySlug}`, expect: all(404), cache: "per-caller" },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/press-kit/terms`, expect: all(200) },
  { method: "put", path: `/api/projects/${DEMO_SLUG}/press-kit/terms`, body: {}, expect: staffOnly(400) },
  // Then-and-now pairs (decision 063): the demo's photos for a public story and an internal one; the facility project's (no photos); bad params.
  { method: "get", path: `/api/projects/${DEMO_SLUG}/then-and-now`, expect: staffOnly(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/then-and-now?audience=internal&area=Hall%202A&minDays=30&limit=5`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.facilitySlug}/then-and-now?audience=investor`, expect: staffOnly(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/then-and-now?audience=everyone&minDays=0`, expect: staffOnly(400) },
  { method: "get", path: "/api/projects/no-such-build/then-and-now", expect: staffOnly(404) },
  // Posts: an investor post is hidden from visitors; a post in review from everyone outside the office.
  { method: "get", path: (ids) => `/api/projects/${DEMO_SLUG}/posts/${ids.investorPostSlug}`, expect: investorAudience(200) },
  { method: "get", path: (ids) => `/api/projects/${DEMO_SLUG}/posts/${ids.publicPostSlug}`, expect: all(200) },
  // Staff read an unpublished post at its address too (the office's preview); nobody else learns it exists.
  { method: "get", path: (ids) => `/api/projects/${DEMO_SLUG}/posts/${ids.postInReviewSlug}`, expect: staffSeeOthersNotFound(200) },
  { method: "get", path: (ids) => `/api/posts/${ids.investorPost}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/posts/${ids.postInReview}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/posts/${ids.postInReview}/revisions`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/posts/${ids.postInReview}/history`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/posts/${ids.postInReview}/return`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/posts/${ids.postInReview}/schedule`, body: {}, expect: writers(400) },
  // Review links (decision 060): made, listed and revoked by whoever may edit the content; read by the link's holder alone.
  { method: "get", path: (ids) => `/api/posts/${ids.postInReview}/review-links`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/posts/${ids.postInReview}/review-links`, body: {}, expect: staffOnly(400) },
  { method: "post", path: (ids) => `/api/posts/${ids.publicPost}/review-links`, body: { name: "Matrix Reviewer", email: "matrix.reviewer@example.test" }, expect: staffOnly(409) },
  { method: "get", path: (ids) => `/api/stories/${ids.draftStory}/review-links`, expect: staffOnly(200) },
  { method: "post", path: (ids) => `/api/stories/${ids.draftStory}/review-links`, body: { days: 31 }, expect: staffOnly(400) },
  { method: "get", path: "/api/posts/999999999/review-links", expect: staffOnly(404) },
  { method: "delete", path: "/api/review-links/999999999", expect: staffOnly(404) },
  { method: "get", path: `/api/review/${BAD_LINK}`, expect: all(404) },
  { method: "get", path: `/api/review/${BAD_LINK}/media/0000000000000000-320w.webp`, expect: all(404) },
  { method: "post", path: `/api/review/${BAD_LINK}/answer`, body: { verdict: "looks_right" }, expect: all(404) },
  { method: "get", path: `/review/${BAD_LINK}`, expect: all(200) },
  { method: "patch", path: (ids) => `/api/posts/${ids.investorPost}`, body: { nonsense: true }, expect: staffOnly(400) },
  { method: "get", path: (ids) => `/projects/${DEMO_SLUG}/updates/${ids.investorPostSlug}`, expect: all(200) },
  // Photo stories: a draft is the office's.
  { method: "get", path: (ids) => `/api/stories/${ids.draftStory}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/stories/${ids.draftStory}/revisions`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/projects/${DEMO_SLUG}/stories/${ids.draftStorySlug}`, expect: staffSeeOthersNotFound(200) },
  // People's records: another subscriber's, an enquiry, a digest run.
  { method: "get", path: (ids) => `/api/subscribers/${ids.otherSubscriber}/export`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/digests/preview?subscriberId=${ids.otherSubscriber}`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/enquiries/${ids.enquiry}`, expect: staffOnly(200) },
  { method: "patch", path: (ids) => `/api/enquiries/${ids.enquiry}`, body: {}, expect: staffOnly(400) },
  { method: "get", path: (ids) => `/api/digests/runs/${ids.digestRun}`, expect: staffOnly(200) },
  // Facility: each caller reads the facility their audience allows; a unit's history follows its system's audience; writes are for leads and admins.
  { method: "get", path: (ids) => `/api/projects/${ids.facilitySlug}/facility`, expect: all(200) },
  { method: "patch", path: (ids) => `/api/site-areas/${ids.internalSiteArea}`, body: {}, expect: writers(400) },
  { method: "get", path: (ids) => `/api/projects/${ids.facilitySlug}/facility?at=2026-06-30`, expect: { admin: 200, lead: 200, marketing: 200, investor: 403, anonymous: 403 } },
  { method: "get", path: (ids) => `/api/projects/${ids.facilitySlug}/facility/events`, expect: staffOnly(200) },
  { method: "put", path: (ids) => `/api/projects/${ids.facilitySlug}/facility/settings`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/blocks/${ids.internalBlock}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/blocks/${ids.investorBlock}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/blocks/${ids.publicBlock}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/systems/${ids.internalSystem}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/systems/${ids.publicSystem}`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/facility/systems/${ids.internalSystem}/units`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/units/${ids.internalUnit}`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/facility/units/${ids.internalUnit}/stage`, body: {}, expect: writers(400) },
  { method: "get", path: (ids) => `/api/facility/units/${ids.internalUnit}/events`, expect: staffSeeOthersNotFound(200) },
  { method: "get", path: (ids) => `/api/facility/units/${ids.investorUnit}/events`, expect: investorAudience(200) },
  { method: "get", path: (ids) => `/api/facility/units/${ids.publicUnit}/events`, expect: all(200) },
  { method: "patch", path: (ids) => `/api/facility/features/${ids.internalFeature}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/facility/features/${ids.publicFeature}`, body: {}, expect: writers(400) },
  // Documents (decision 038): signed-in readers by audience and organisation; an investor's copy is stamped, staff's clean; writes for leads and admins.
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/documents`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/documents?category=certificate`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/documents?category=gossip`, expect: signedIn(400) },
  { method: "get", path: (ids) => `/api/documents/${ids.investorDocument}`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/documents/${ids.internalDocument}`, expect: { admin: 200, lead: 200, marketing: 404, investor: 404, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/documents/${ids.otherOrganisationDocument}`, expect: { admin: 200, lead: 200, marketing: 200, investor: 404, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/documents/${ids.investorDocument}/file?as=view`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/documents/${ids.investorDocument}/file?clean=1`, expect: { admin: 200, lead: 200, marketing: 200, investor: 403, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/documents/${ids.internalDocument}/file`, expect: { admin: 200, lead: 200, marketing: 404, investor: 404, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/documents/${ids.otherOrganisationDocument}/file`, expect: { admin: 200, lead: 200, marketing: 200, investor: 404, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/documents/${ids.investorDocument}/views`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/documents/${ids.internalDocument}/views`, expect: { admin: 200, lead: 200, marketing: 404, investor: 403, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/document-views`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/document-views?format=csv`, expect: staffOnly(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.documentsSlug}/my-document-views`, expect: investorOnly(200) },
  { method: "post", path: (ids) => `/api/projects/${ids.documentsSlug}/documents`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/documents/${ids.investorDocument}/versions`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/documents/${ids.internalDocument}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/documents/${ids.otherOrganisationDocument}`, body: {}, expect: writers(400) },
  { method: "get", path: "/api/documents/999999999", expect: { admin: 404, lead: 404, marketing: 404, investor: 404, anonymous: 401 } },
  { method: "get", path: "/api/documents/999999999/file", expect: { admin: 404, lead: 404, marketing: 404, investor: 404, anonymous: 401 } },
  { method: "delete", path: "/api/documents/999999999", expect: writers(404) },
];

/** Staff with the whole record see it; investors and marketing are told it does not exist; visitors must sign in (decision 036). */
const internalRecord = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: 404, investor: 404, anonymous: 401 });

/** Risks and decisions needed (decision 036): signed-in readers by audience, writes for leads and admins, nothing public. */
const RECORD_ROWS: MatrixRow[] = [
  { method: "get", path: `/api/projects/${DEMO_SLUG}/risks`, expect: signedIn(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/risks?band=high&kind=risk&status=open`, expect: signedIn(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/risks?band=scarlet`, expect: signedIn(400) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/risks/summary`, expect: signedIn(200) },
  { method: "get", path: "/api/projects/no-such-project/risks", expect: signedIn(404) },
  { method: "post", path: `/api/projects/${DEMO_SLUG}/risks`, body: {}, expect: writers(400) },
  { method: "get", path: "/api/risks/999999999", expect: signedIn(404) },
  { method: "get", path: "/api/risks/999999999/events", expect: signedIn(404) },
  { method: "patch", path: "/api/risks/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "post", path: "/api/risks/999999999/issue", body: { version: 1, impactNow: "Late" }, expect: writers(404) },
  { method: "delete", path: "/api/risks/999999999", expect: writers(404) },
  { method: "post", path: "/api/risks/999999999/mitigations", body: {}, expect: writers(400) },
  { method: "patch", path: "/api/mitigations/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/mitigations/999999999", expect: writers(404) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/decisions`, expect: signedIn(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/decisions?status=open`, expect: signedIn(200) },
  { method: "post", path: `/api/projects/${DEMO_SLUG}/decisions`, body: {}, expect: writers(400) },
  { method: "get", path: "/api/decisions/999999999", expect: signedIn(404) },
  { method: "get", path: "/api/decisions/999999999/events", expect: signedIn(404) },
  { method: "patch", path: "/api/decisions/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "post", path: "/api/decisions/999999999/outcome", body: {}, expect: writers(400) },
  { method: "post", path: "/api/decisions/999999999/withdraw", body: { version: 1, reason: "x" }, expect: writers(404) },
  // Real objects of each audience: an investor risk and decision, an internal risk and decision.
  { method: "get", path: (ids) => `/api/projects/${ids.recordSlug}/risks`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/projects/${ids.recordSlug}/decisions`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/risks/${ids.investorRisk}`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/risks/${ids.investorRisk}/events`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/risks/${ids.internalRisk}`, expect: internalRecord(200) },
  { method: "get", path: (ids) => `/api/risks/${ids.internalRisk}/events`, expect: internalRecord(200) },
  { method: "patch", path: (ids) => `/api/risks/${ids.investorRisk}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/risks/${ids.internalRisk}`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/risks/${ids.internalRisk}/issue`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/risks/${ids.internalRisk}/mitigations`, body: {}, expect: writers(400) },
  { method: "get", path: (ids) => `/api/decisions/${ids.investorDecision}`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/decisions/${ids.investorDecision}/events`, expect: signedIn(200) },
  { method: "get", path: (ids) => `/api/decisions/${ids.internalDecision}`, expect: internalRecord(200) },
  { method: "get", path: (ids) => `/api/decisions/${ids.internalDecision}/events`, expect: internalRecord(200) },
  { method: "patch", path: (ids) => `/api/decisions/${ids.internalDecision}`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/decisions/${ids.investorDecision}/outcome`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/decisions/${ids.internalDecision}/withdraw`, body: {}, expect: writers(400) },
];

/** Money (decision 037): investors read investor-audience changes and the position; leads and admins everything; marketing none of it. */
const moneyReaders = (ok: number): Record<Caller, number> => ({ admin: ok, lead: ok, marketing: 403, investor: ok, anonymous: 401 });

/** Budget changes, the cost position and investor organisations (decision 037). */
const BUDGET_ROWS: MatrixRow[] = [
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget-changes`, expect: moneyReaders(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget-changes?status=approved`, expect: moneyReaders(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget-changes?status=pending`, expect: moneyReaders(400) },
  { method: "get", path: "/api/projects/no-such-project/budget-changes", expect: moneyReaders(404) },
  { method: "post", path: `/api/projects/${DEMO_SLUG}/budget-changes`, body: {}, expect: writers(400) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget`, expect: moneyReaders(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget?at=2026-06-30`, expect: moneyReaders(200) },
  { method: "get", path: `/api/projects/${DEMO_SLUG}/budget?at=not-a-day`, expect: moneyReaders(400) },
  { method: "put", path: `/api/projects/${DEMO_SLUG}/budget/settings`, body: {}, expect: writers(400) },
  { method: "get", path: "/api/budget-changes/999999999", expect: moneyReaders(404) },
  { method: "get", path: "/api/budget-changes/999999999/events", expect: moneyReaders(404) },
  { method: "patch", path: "/api/budget-changes/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/budget-changes/999999999", expect: writers(404) },
  // Real objects: an investor change is the investor's to read; an internal one exists for leads and admins only.
  { method: "get", path: (ids) => `/api/budget-changes/${ids.investorChange}`, expect: moneyReaders(200) },
  { method: "get", path: (ids) => `/api/budget-changes/${ids.investorChange}/events`, expect: moneyReaders(200) },
  { method: "get", path: (ids) => `/api/budget-changes/${ids.internalChange}`, expect: { admin: 200, lead: 200, marketing: 403, investor: 404, anonymous: 401 } },
  { method: "get", path: (ids) => `/api/budget-changes/${ids.internalChange}/events`, expect: { admin: 200, lead: 200, marketing: 403, investor: 404, anonymous: 401 } },
  { method: "patch", path: (ids) => `/api/budget-changes/${ids.investorChange}`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/budget-changes/${ids.internalChange}`, body: {}, expect: writers(400) },
  // Organisations: staff read them; admins add them and give investors one.
  { method: "get", path: "/api/organisations", expect: staffOnly(200) },
  { method: "post", path: "/api/organisations", body: {}, expect: adminOnly(400) },
  { method: "patch", path: "/api/users/1/organisation", body: {}, expect: adminOnly(400) },
  { method: "patch", path: "/api/users/999999999/organisation", body: { organisationId: null }, expect: adminOnly(404) },
];

export const ROLE_MATRIX: MatrixRow[] = [
  { method: "get", path: "/api/health", expect: all(200) },
  { method: "get", path: "/api/auth/csrf", expect: all(200) },
  { method: "get", path: "/api/auth/me", expect: signedIn(200) },
  { method: "get", path: "/api/auth/session", expect: all(200) },
  { method: "get", path: "/api/auth/password-reset/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", expect: all(410) },
  { method: "post", path: "/api/auth/login", body: {}, expect: all(400) },
  { method: "get", path: "/api/auth/invitations/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", expect: all(404) },
  { method: "post", path: "/api/auth/invitations/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa/accept", body: {}, expect: all(400) },
  { method: "post", path: "/api/auth/password-reset", body: {}, expect: all(400) },
  { method: "post", path: "/api/auth/password-reset/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa", body: {}, expect: all(400) },
  { method: "get", path: "/api/users", expect: adminOnly(200) },
  { method: "get", path: "/api/users/invitations", expect: adminOnly(200) },
  { method: "get", path: "/api/users/staff", expect: staffOnly(200) },
  { method: "post", path: "/api/users/invitations", body: {}, expect: adminOnly(400) },
  { method: "patch", path: "/api/users/1", body: {}, expect: adminOnly(400) },
  { method: "get", path: "/api/audit", expect: adminOnly(200) },
  { method: "get", path: "/api/outbox", expect: adminOnly(200) },
  { method: "get", path: "/api/outbox/999999999", expect: adminOnly(404) },
  { method: "get", path: "/api/outbox/999999999/raw", expect: adminOnly(404) },
  { method: "get", path: "/api/projects", expect: all(200), cache: "shared" },
  { method: "get", path: "/api/projects/aldermere-phase-2", expect: all(200), cache: "shared" },
  { method: "get", path: "/api/projects/no-such-project", expect: all(404) },
  { method: "get", path: "/office", expect: all(200) },
  { method: "get", path: "/office/users", expect: all(200) },
  { method: "get", path: "/investors", expect: all(200) },
  { method: "get", path: "/investors/projects/aldermere-phase-2", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2", expect: all(200) },
  // Programme. Milestone 1 is the demo's first (public) milestone: the demo is seeded into
  // the empty test database before any test runs.
  { method: "get", path: `${DEMO_PROGRAMME}/milestones`, expect: all(200) },
  { method: "get", path: "/api/projects/no-such-project/milestones", expect: all(404) },
  { method: "post", path: `${DEMO_PROGRAMME}/milestones`, body: {}, expect: writers(400) },
  { method: "post", path: `${DEMO_PROGRAMME}/milestones/shift`, body: {}, expect: writers(400) },
  { method: "post", path: `${DEMO_PROGRAMME}/milestones/import`, body: {}, expect: writers(400) },
  { method: "get", path: `${DEMO_PROGRAMME}/milestones.csv`, expect: staffOnly(200) },
  { method: "patch", path: "/api/milestones/1", body: {}, expect: writers(400) },
  { method: "delete", path: "/api/milestones/999999999", expect: writers(404) },
  // Removal keeps the record (a reason is required); a milestone on record is never deleted.
  { method: "post", path: "/api/milestones/1/remove", body: {}, expect: writers(400) },
  { method: "post", path: "/api/milestones/999999999/remove", body: { reason: "Moved to Hall 2B" }, expect: writers(404) },
  { method: "post", path: "/api/milestones/1/restore", body: {}, expect: writers(400) },
  { method: "post", path: "/api/milestones/999999999/restore", body: { reason: "Back in Phase 2" }, expect: writers(404) },
  // The demo's first milestone: later ones depend on it, so deleting it is refused before anything is written.
  { method: "delete", path: "/api/milestones/1", expect: writers(422) },
  { method: "get", path: `${DEMO_PROGRAMME}/milestones?removed=only`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/milestones?removed=bogus`, expect: all(400) },
  { method: "get", path: "/api/milestones/1/events", expect: all(200) },
  { method: "get", path: "/api/milestones/999999999/events", expect: all(404) },
  { method: "get", path: "/api/milestones/1/drivers", expect: all(200) },
  { method: "get", path: "/api/milestones/999999999/drivers", expect: all(404) },
  { method: "get", path: `${DEMO_PROGRAMME}/changes?from=2026-01-01&to=2026-12-31`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/changes`, expect: all(400) },
  { method: "get", path: `${DEMO_PROGRAMME}/moves?from=2026-01-01&to=2026-12-31`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/health`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/health?at=2026-06-30`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/curve`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/baselines`, expect: signedIn(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/baselines/1`, expect: signedIn(200) },
  { method: "post", path: `${DEMO_PROGRAMME}/baselines`, body: {}, expect: writers(400) },
  { method: "get", path: `${DEMO_PROGRAMME}/cost-actuals`, expect: signedIn(200) },
  { method: "post", path: `${DEMO_PROGRAMME}/cost-actuals`, body: {}, expect: writers(400) },
  // Subscriptions (visitors, by signed link), the investor room's digest, the site office's list.
  { method: "get", path: "/api/projects/aldermere-phase-2/subscription-options", expect: all(200), cache: "shared" },
  { method: "get", path: "/api/projects/no-such-project/subscription-options", expect: all(404) },
  { method: "post", path: "/api/subscriptions", body: {}, expect: all(400) },
  { method: "get", path: `/api/subscriptions/confirm/${BAD_LINK}`, expect: all(400) },
  { method: "post", path: `/api/subscriptions/confirm/${BAD_LINK}`, body: {}, expect: all(400) },
  { method: "get", path: `/api/subscriptions/preferences/${BAD_LINK}`, expect: all(400) },
  { method: "patch", path: `/api/subscriptions/preferences/${BAD_LINK}`, body: {}, expect: all(400) },
  { method: "post", path: `/api/subscriptions/preferences/${BAD_LINK}/unsubscribe`, body: {}, expect: all(400) },
  { method: "get", path: `/api/subscriptions/unsubscribe/${BAD_LINK}`, expect: all(400) },
  { method: "post", path: `/api/subscriptions/unsubscribe/${BAD_LINK}`, body: {}, expect: all(400) },
  { method: "post", path: `/u/${BAD_LINK}`, body: {}, expect: all(400) },
  { method: "post", path: "/api/webhooks/mail-events", body: {}, expect: all(401) },
  { method: "get", path: "/api/investors/digest", expect: investorOnly(200) },
  { method: "patch", path: "/api/investors/digest/aldermere-phase-2", body: {}, expect: investorOnly(400) },
  // Every subscriber's archive (decision 045): by the signed preferences link (a link not ours is 404), or an investor's own.
  { method: "get", path: `/api/subscriptions/preferences/${BAD_LINK}/digests`, expect: all(404) },
  { method: "get", path: `/api/subscriptions/preferences/${BAD_LINK}/digests/1`, expect: all(404) },
  { method: "get", path: "/api/me/digests", expect: investorOnly(200) },
  { method: "get", path: "/api/me/digests?page=0", expect: investorOnly(400) },
  { method: "get", path: "/api/me/digests/999999999", expect: investorOnly(404) },
  { method: "get", path: "/api/subscribers", expect: staffOnly(200) },
  { method: "get", path: "/api/subscribers/export.csv", expect: staffOnly(200) },
  { method: "post", path: "/api/subscribers/import", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/subscribers/999999999/export", expect: staffOnly(404) },
  { method: "delete", path: "/api/subscribers/999999999", expect: staffOnly(404) },
  // Enquiries
  { method: "post", path: "/api/projects/aldermere-phase-2/enquiries", body: {}, expect: all(400) },
  { method: "get", path: "/api/enquiries", expect: staffOnly(200) },
  { method: "get", path: "/api/enquiries/owners", expect: staffOnly(200) },
  { method: "get", path: "/api/enquiries/999999999", expect: staffOnly(404) },
  { method: "patch", path: "/api/enquiries/999999999", body: {}, expect: staffOnly(400) },
  { method: "patch", path: "/api/enquiries/999999999", body: { status: "closed" }, expect: staffOnly(404) },
  // Their pages: the HTML shell for everyone; the client guards the office and investor ones.
  { method: "get", path: "/subscribe", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2/subscribe", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2/enquire", expect: all(200) },
  { method: "get", path: `/subscriptions/confirm/${BAD_LINK}`, expect: all(200) },
  { method: "get", path: `/subscriptions/preferences/${BAD_LINK}`, expect: all(200) },
  { method: "get", path: `/u/${BAD_LINK}`, expect: all(200) },
  { method: "get", path: "/office/subscribers", expect: all(200) },
  { method: "get", path: "/office/enquiries", expect: all(200) },
  { method: "get", path: "/investors/digest", expect: all(200) },
  // Media library: staff; sensitivity for leads and admins; derivatives behind the audience check.
  { method: "get", path: "/api/media", expect: staffOnly(200) },
  { method: "get", path: "/api/media?project=aldermere-phase-2&missingAlt=true&page=2", expect: staffOnly(200) },
  { method: "get", path: "/api/media?sensitivity=secret", expect: staffOnly(400) },
  { method: "post", path: "/api/media", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/media/vocabulary", expect: staffOnly(200) },
  { method: "get", path: "/api/media/review", expect: mediaReviewers(200) },
  { method: "post", path: "/api/media/bulk-tags", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/media/999999999", expect: staffOnly(404) },
  { method: "patch", path: "/api/media/999999999", body: {}, expect: staffOnly(400) },
  { method: "patch", path: "/api/media/999999999", body: { caption: "x" }, expect: staffOnly(404) },
  { method: "patch", path: "/api/media/999999999", body: { sensitivity: "cleared" }, expect: { admin: 404, lead: 404, marketing: 403, investor: 403, anonymous: 401 } },
  { method: "post", path: "/api/media/999999999/review", body: {}, expect: mediaReviewers(400) },
  { method: "post", path: "/api/media/999999999/retry", body: {}, expect: staffOnly(404) },
  { method: "get", path: "/api/media/999999999/original", expect: staffOnly(404) },
  { method: "get", path: "/media/v/0000000000000000-320w.webp", expect: all(404) },
  // Signed derivative links: the signature is the permission, whoever calls (a forged one is 404, a bad query 400).
  { method: "get", path: `/media/s/0000000000000000-320w.webp?exp=4102444800&sig=${"a".repeat(43)}`, expect: all(404) },
  { method: "get", path: "/media/s/0000000000000000-320w.webp?exp=soon", expect: all(400) },
  { method: "get", path: "/office/media", expect: all(200) },
  { method: "get", path: "/office/media/review", expect: all(200) },
  // Updates (posts): reads for everyone (filtered by audience), writing for staff, approving and publishing for leads and admins.
  { method: "get", path: "/api/projects/aldermere-phase-2/posts", expect: all(200) },
  { method: "get", path: "/api/projects/aldermere-phase-2/posts?q=chillers", expect: all(200) },
  { method: "get", path: "/api/projects/aldermere-phase-2/posts/no-such-update", expect: all(404) },
  { method: "post", path: "/api/projects/aldermere-phase-2/posts", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/posts/999999999", expect: staffOnly(404) },
  { method: "patch", path: "/api/posts/999999999", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/posts/999999999/revisions", expect: staffOnly(404) },
  { method: "get", path: "/api/posts/999999999/history", expect: staffOnly(404) },
  { method: "get", path: "/api/posts/999999999/revisions/1/diff", expect: staffOnly(404) },
  { method: "post", path: "/api/posts/999999999/revisions/1/restore", expect: staffOnly(404) },
  { method: "post", path: "/api/posts/999999999/submit", expect: staffOnly(404) },
  { method: "post", path: "/api/posts/999999999/approve", expect: writers(404) },
  { method: "post", path: "/api/posts/999999999/return", body: {}, expect: writers(400) },
  { method: "post", path: "/api/posts/999999999/publish", expect: writers(404) },
  { method: "post", path: "/api/posts/999999999/schedule", body: {}, expect: writers(400) },
  { method: "post", path: "/api/posts/999999999/withdraw", expect: writers(404) },
  // Photo stories: the same rules.
  { method: "get", path: "/api/projects/aldermere-phase-2/stories", expect: all(200) },
  { method: "get", path: "/api/projects/aldermere-phase-2/stories/no-such-story", expect: all(404) },
  { method: "post", path: "/api/projects/aldermere-phase-2/stories", body: {}, expect: staffOnly(400) },
  { method: "get", path: "/api/stories/999999999", expect: staffOnly(404) },
  { method: "patch", path: "/api/stories/999999999", body: {}, expect: staffOnly(400) },
  { method: "post", path: "/api/stories/999999999/submit", expect: staffOnly(404) },
  { method: "post", path: "/api/stories/999999999/approve", expect: writers(404) },
  { method: "post", path: "/api/stories/999999999/return", body: {}, expect: writers(400) },
  { method: "post", path: "/api/stories/999999999/publish", expect: writers(404) },
  { method: "post", path: "/api/stories/999999999/withdraw", expect: writers(404) },
  { method: "post", path: "/api/stories/999999999/schedule", body: {}, expect: writers(400) },
  { method: "get", path: "/api/stories/999999999/revisions", expect: staffOnly(404) },
  { method: "get", path: "/api/stories/999999999/history", expect: staffOnly(404) },
  { method: "get", path: "/api/stories/999999999/revisions/1/diff", expect: staffOnly(404) },
  { method: "post", path: "/api/stories/999999999/revisions/1/restore", expect: staffOnly(404) },
  // Digests: the site office's runs, previews and tests for staff; the web copy by its signed link only.
  { method: "post", path: "/api/digests/runs", body: {}, expect: staffOnly(400) },
  { method: "post", path: "/api/digests/runs", body: { projectSlug: "aldermere-phase-2", frequency: "weekly", at: "2099-01-01T00:00:00Z" }, expect: staffOnly(400) },
  { method: "get", path: "/api/digests/runs", expect: staffOnly(200) },
  { method: "get", path: "/api/digests/runs/999999999", expect: staffOnly(404) },
  { method: "post", path: "/api/digests/runs/999999999/pause", expect: staffOnly(404) },
  { method: "post", path: "/api/digests/runs/999999999/resume", expect: staffOnly(404) },
  { method: "get", path: "/api/digests/upcoming", expect: staffOnly(200) },
  { method: "get", path: "/api/digests/preview", expect: staffOnly(400) },
  { method: "get", path: "/api/digests/preview?subscriberId=999999999", expect: staffOnly(404) },
  { method: "post", path: "/api/digests/test", body: {}, expect: staffOnly(400) },
  { method: "get", path: `/api/digests/web/${BAD_LINK}`, expect: all(400) },
  { method: "get", path: "/office/digests", expect: all(200) },
  // The public site's documents and pages.
  { method: "get", path: "/feed/aldermere-phase-2.atom", expect: all(200) },
  { method: "get", path: "/feed/no-such-project.atom", expect: all(404) },
  // Monthly reports: leads, admins and investors (marketing reads no money); investors only issued investor reports, never a draft.
  { method: "get", path: (ids) => `/api/projects/${ids.reportsSlug}/reports`, expect: reportReaders(200, 200) },
  { method: "get", path: "/api/projects/no-such-project/reports", expect: reportReaders(404, 404) },
  { method: "get", path: (ids) => `/api/reports/${ids.issuedReport}`, expect: reportReaders(200, 200) },
  { method: "get", path: (ids) => `/api/reports/${ids.draftReport}`, expect: reportReaders(200, 404) },
  { method: "get", path: (ids) => `/api/reports/${ids.internalReport}`, expect: reportReaders(200, 404) },
  { method: "get", path: (ids) => `/api/reports/${ids.issuedReport}/pdf`, expect: reportReaders(200, 200) },
  { method: "get", path: (ids) => `/api/reports/${ids.draftReport}/pdf`, expect: reportReaders(200, 404) },
  { method: "get", path: (ids) => `/api/reports/${ids.internalReport}/pdf`, expect: reportReaders(200, 404) },
  { method: "get", path: "/api/reports/999999999", expect: reportReaders(404, 404) },
  { method: "post", path: (ids) => `/api/projects/${ids.reportsSlug}/reports`, body: {}, expect: writers(400) },
  { method: "patch", path: (ids) => `/api/reports/${ids.draftReport}`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/reports/${ids.draftReport}/issue`, body: {}, expect: writers(400) },
  { method: "post", path: (ids) => `/api/reports/${ids.issuedReport}/correct`, body: {}, expect: writers(400) },
  // Milestone calendars: the public one for everyone; personal feeds made by any signed-in reader, read by their token alone.
  { method: "get", path: `/projects/${DEMO_SLUG}/calendar.ics`, expect: all(200) },
  { method: "get", path: "/projects/no-such-project/calendar.ics", expect: all(404) },
  { method: "post", path: `${DEMO_PROGRAMME}/calendar-feed`, body: {}, expect: signedIn(201) },
  { method: "post", path: `${DEMO_PROGRAMME}/calendar-feed`, body: { audience: "internal" }, expect: signedIn(400) },
  { method: "post", path: "/api/projects/no-such-project/calendar-feed", body: {}, expect: signedIn(404) },
  { method: "delete", path: `${DEMO_PROGRAMME}/calendar-feed`, expect: signedIn(204) },
  { method: "get", path: `/calendars/${"a".repeat(43)}.ics`, expect: all(404) },
  { method: "get", path: "/calendars/not-a-token.ics", expect: all(404) },
  { method: "get", path: "/sitemap.xml", expect: all(200) },
  { method: "get", path: "/robots.txt", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2/updates/no-such-update", expect: all(200) },
  { method: "get", path: "/projects/aldermere-phase-2/stories/no-such-story", expect: all(200) },
  // A published public story's page is served to everyone; a draft's address gives nothing of it away (the same shell as an unknown one).
  { method: "get", path: (ids) => `/projects/${DEMO_SLUG}/stories/${ids.publishedStorySlug}`, expect: all(200) },
  { method: "get", path: (ids) => `/projects/${DEMO_SLUG}/stories/${ids.draftStorySlug}`, expect: all(200) },
  { method: "get", path: "/api/projects/aldermere-phase-2/gallery", expect: all(200) },
  // The home page's builds and the project's hero photograph (decision 055): read by everyone; chosen by leads and admins.
  { method: "get", path: "/api/home", expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/hero`, expect: all(200) },
  { method: "get", path: "/api/projects/no-such-project/hero", expect: all(404) },
  { method: "put", path: `${DEMO_PROGRAMME}/hero`, body: {}, expect: writers(400) },
  { method: "put", path: "/api/projects/no-such-project/hero", body: {}, expect: writers(400) },
  // Search (decision 048): open to every caller, each answered by audience; q is required.
  { method: "get", path: `${DEMO_PROGRAMME}/search?q=HD-1`, expect: all(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/search`, expect: all(400) },
  { method: "get", path: "/api/projects/no-such-project/search?q=HD-1", expect: all(404) },
  // The office overview's "Waiting for you": staff only, each counted by role in the service.
  { method: "get", path: "/api/office/waiting", expect: staffOnly(200) },
  // Facility (decision 029): the fixed read for everyone by audience; another day for staff; writes for leads and admins.
  { method: "get", path: `${DEMO_PROGRAMME}/facility`, expect: all(200) },
  { method: "get", path: "/api/projects/no-such-project/facility", expect: all(404) },
  { method: "get", path: `${DEMO_PROGRAMME}/facility?at=not-a-day`, expect: all(400) },
  { method: "get", path: `${DEMO_PROGRAMME}/facility?colour=orange`, expect: all(400) },
  { method: "get", path: `${DEMO_PROGRAMME}/facility/events?from=2026-01-01&to=2026-12-31`, expect: staffOnly(200) },
  { method: "get", path: `${DEMO_PROGRAMME}/facility/events?from=2026-02-01&to=2026-01-01`, expect: staffOnly(400) },
  { method: "post", path: `${DEMO_PROGRAMME}/facility/blocks`, body: {}, expect: writers(400) },
  { method: "patch", path: "/api/facility/blocks/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/facility/blocks/999999999", expect: writers(404) },
  { method: "post", path: `${DEMO_PROGRAMME}/facility/systems`, body: {}, expect: writers(400) },
  { method: "patch", path: "/api/facility/systems/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/facility/systems/999999999", expect: writers(404) },
  { method: "post", path: "/api/facility/systems/999999999/units", body: { label: "Fan 9" }, expect: writers(404) },
  { method: "patch", path: "/api/facility/units/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "post", path: "/api/facility/units/999999999/stage", body: { version: 1, stage: "L4" }, expect: writers(404) },
  { method: "get", path: "/api/facility/units/999999999/events", expect: all(404) },
  { method: "delete", path: "/api/facility/units/999999999", expect: writers(404) },
  { method: "post", path: `${DEMO_PROGRAMME}/facility/features`, body: {}, expect: writers(400) },
  { method: "patch", path: "/api/facility/features/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/facility/features/999999999", expect: writers(404) },
  { method: "get", path: `${DEMO_PROGRAMME}/site-plan`, expect: all(200) },
  // Drafts suggested by the programme (decision 061): those who start updates.
  { method: "get", path: `${DEMO_PROGRAMME}/draft-suggestion?audience=public`, expect: { admin: 200, lead: 200, marketing: 200, investor: 403, anonymous: 401 } },
  { method: "get", path: `${DEMO_PROGRAMME}/draft-suggestion?audience=everyone`, expect: { admin: 400, lead: 400, marketing: 400, investor: 403, anonymous: 401 } },
  { method: "get", path: "/api/projects/no-such-project/draft-suggestion", expect: { admin: 404, lead: 404, marketing: 404, investor: 403, anonymous: 401 } },
  { method: "post", path: `${DEMO_PROGRAMME}/draft-suggestion/draft`, body: {}, expect: { admin: 400, lead: 400, marketing: 400, investor: 403, anonymous: 401 } },
  { method: "get", path: "/api/projects/no-such-project/site-plan", expect: all(404) },
  { method: "post", path: `${DEMO_PROGRAMME}/site-areas`, body: {}, expect: writers(400) },
  { method: "patch", path: "/api/site-areas/999999999", body: { version: 1 }, expect: writers(404) },
  { method: "delete", path: "/api/site-areas/999999999", expect: writers(404) },
  { method: "post", path: "/api/auth/logout", expect: all(204) },
  ...REAL_OBJECT_ROWS,
  ...BUDGET_ROWS,
  ...RECORD_ROWS,
];

/** HEAD answers as GET does, for every GET a visitor may call. */
export const ROLE_MATRIX_WITH_HEAD: MatrixRow[] = [
  ...ROLE_MATRIX,
  ...ROLE_MATRIX.filter((row) => row.method === "get" && row.expect.anonymous !== 401).map((row) => ({ ...row, method: "head" as const })),
];
