import { z } from "zod";
import { EmailSchema } from "./common.ts";
import { SystemSchema } from "./programme.ts";
import { pageAnswerShape, pageQueryShape } from "./paging.ts";
import { ProjectRefSchema, ProjectSchema } from "./projects.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the subscribers module (server/subscribers ↔ src/features/subscribers):
 * public subscription by double opt-in, preferences by signed link, the investor room's own
 * digest, and the site office's list, import, export and erasure.
 */

export const InterestSchema = z.enum(["prospect", "investor", "press", "neighbour"]);
export type Interest = z.infer<typeof InterestSchema>;
export const FrequencySchema = z.enum(["immediate", "weekly", "monthly"]);
export type Frequency = z.infer<typeof FrequencySchema>;
export const SubscriberStatusSchema = z.enum(["pending", "confirmed", "unsubscribed", "bounced", "complained"]);
export type SubscriberStatus = z.infer<typeof SubscriberStatusSchema>;
export const SubscriberAudienceSchema = z.enum(["public", "investor"]);
export type SubscriberAudience = z.infer<typeof SubscriberAudienceSchema>;

/**
 * The consent wording shown beside the subscribe form. Its version is stored with each
 * consent; change the version whenever the words change.
 */
export const CONSENT = {
  version: "2026-12-01",
  text:
    "Send me e-mail about the progress of this build, at the frequency and on the topics I chose. " +
    "My name, e-mail address, organisation and choices are used only to send these e-mails; " +
    "the time and network address of this request are kept as the record of my consent. " +
    "Nothing is sent until I confirm from the e-mail I receive, and every e-mail has a link to change my choices or leave at once.",
} as const;

/**
 * The consent wording of an investor account's own digest, chosen in the investor room while
 * signed in: the account's address is already proven, so the digest starts at once (no
 * confirmation e-mail, unlike `CONSENT`). Its own version is stored with the consent.
 */
export const INVESTOR_CONSENT = {
  version: "2026-12-05-investor",
  text:
    "Send the investor digest of this build to my account's e-mail address, at the frequency and on the topics I chose. " +
    "My account details and choices are used only to send it; the time and network address of this choice are kept as the record of my consent. " +
    "Because I am signed in, it starts at once with no confirmation e-mail; every digest has a link to change my choices or stop, and I can turn it off here at any time.",
} as const;

const ProjectSlugSchema = z
  .string({ error: "is required" })
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "is not a valid project address")
  .max(100);

const AreaNameSchema = plainText().min(1, "must not be empty").max(100, "must be at most 100 characters");

/**
 * Topics: the areas (e.g. "Hall 2A") and plant systems a subscriber follows. An item
 * matches when it carries any chosen area or any chosen system. `null` (or leaving the
 * field out) means every topic.
 */
export const TopicsSchema = z
  .strictObject({
    areas: z.array(AreaNameSchema).max(50, "choose at most 50 areas"),
    systems: z.array(SystemSchema).max(SystemSchema.options.length),
  })
  .refine((t) => t.areas.length + t.systems.length > 0, {
    message: "choose at least one area or system, or follow every topic",
  });
export type Topics = z.infer<typeof TopicsSchema>;

const NameSchema = plainText({ error: "is required" }).min(1, "is required").max(200, "must be at most 200 characters");
const OrganisationSchema = plainText().max(200, "must be at most 200 characters");

/** POST /api/subscriptions → 202, the same answer whether or not the address is known. */
export const SubscriptionInputSchema = z.strictObject({
  email: EmailSchema,
  name: NameSchema,
  organisation: OrganisationSchema.optional(),
  interest: InterestSchema,
  topics: TopicsSchema.nullable().optional(),
  frequency: FrequencySchema,
  projectSlug: ProjectSlugSchema,
});
export type SubscriptionInput = z.infer<typeof SubscriptionInputSchema>;

export const SubscriptionAcceptedSchema = z.object({ ok: z.literal(true), message: z.string() });
export type SubscriptionAccepted = z.infer<typeof SubscriptionAcceptedSchema>;

/** The signed token of a confirmation, preferences or unsubscribe link. */
export const SubscriberTokenParamSchema = z.strictObject({
  token: z.string().regex(/^[A-Za-z0-9_-]{8,400}\.[A-Za-z0-9_-]{43}$/, "is not a valid link"),
});

/** The confirm button and the page's unsubscribe button send no fields. */
export const EmptyInputSchema = z.strictObject({});

/** RFC 8058 §3.1: the one-click POST carries exactly `List-Unsubscribe=One-Click`. */
export const OneClickBodySchema = z.strictObject({ "List-Unsubscribe": z.literal("One-Click") });

/** PATCH /api/subscriptions/preferences/:token */
export const PreferencesInputSchema = z
  .strictObject({
    name: NameSchema.optional(),
    organisation: OrganisationSchema.optional(),
    frequency: FrequencySchema.optional(),
    topics: TopicsSchema.nullable().optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: "change at least one thing" });
export type PreferencesInput = z.infer<typeof PreferencesInputSchema>;

/** PATCH /api/investors/digest/:slug — an investor account's own digest. */
export const InvestorDigestInputSchema = z.strictObject({
  enabled: z.boolean({ error: "must be true or false" }),
  frequency: FrequencySchema,
  topics: TopicsSchema.nullable(),
});
export type InvestorDigestInput = z.infer<typeof InvestorDigestInputSchema>;

/** The project a subscription is about, as the pages name it. */
const ConsentWordingSchema = z.object({ version: z.string(), text: z.string() });
/** The topics a subscriber may choose from: the project's public areas and the plant systems. */
const TopicChoicesSchema = z.object({
  /** Areas named by the project's public programme. */
  areas: z.array(z.string()),
  systems: z.array(SystemSchema),
});

/** A subscription as the site office lists it (GET /api/subscribers); the pages its links open show part of it. */
export const SubscriberRowSchema = z.object({
  id: z.number(),
  project: ProjectRefSchema,
  ...SubscriptionInputSchema.pick({ email: true, name: true, interest: true, frequency: true }).shape,
  organisation: z.string().nullable(),
  audience: SubscriberAudienceSchema,
  topics: TopicsSchema.nullable(),
  status: SubscriberStatusSchema,
  /** Linked to an investor account (set in the investor room). */
  account: z.boolean(),
  consentAt: z.string().nullable(),
  consentSource: z.string().nullable(),
  consentVersion: z.string().nullable(),
  confirmedAt: z.string().nullable(),
  lastDigestAt: z.string().nullable(),
  createdAt: z.string(),
});
export type SubscriberRow = z.infer<typeof SubscriberRowSchema>;

/** GET /api/projects/:slug/subscription-options */
export const SubscriptionOptionsSchema = z.object({
  project: ProjectSchema.pick({ slug: true, name: true, operatorName: true }),
  consent: ConsentWordingSchema,
  ...TopicChoicesSchema.shape,
});
export type SubscriptionOptions = z.infer<typeof SubscriptionOptionsSchema>;

/** GET /api/subscriptions/confirm/:token — describes the link; changes nothing. */
export const ConfirmationViewSchema = SubscriberRowSchema.pick({ email: true, name: true, project: true, status: true }).extend({ consent: ConsentWordingSchema });
export type ConfirmationView = z.infer<typeof ConfirmationViewSchema>;

/** POST /api/subscriptions/confirm/:token */
export const ConfirmationDoneSchema = z.object({
  status: z.literal("confirmed"),
  /** The subscriber's own preferences page (same-site path). */
  preferencesPath: z.string(),
});
export type ConfirmationDone = z.infer<typeof ConfirmationDoneSchema>;

/** GET and PATCH /api/subscriptions/preferences/:token */
export const PreferencesViewSchema = SubscriberRowSchema.pick({ email: true, name: true, organisation: true, interest: true, frequency: true, topics: true, status: true, project: true }).extend({ options: TopicChoicesSchema });
export type PreferencesView = z.infer<typeof PreferencesViewSchema>;

/** GET /api/subscriptions/unsubscribe/:token */
export const UnsubscribeViewSchema = SubscriberRowSchema.pick({ email: true, project: true, status: true });
export type UnsubscribeView = z.infer<typeof UnsubscribeViewSchema>;

/** What leaving answers (from the preferences page or the unsubscribe page): the subscription's status now. */
export const SubscriptionStatusResultSchema = z.object({ status: SubscriberStatusSchema });
export type SubscriptionStatusResult = z.infer<typeof SubscriptionStatusResultSchema>;

/** GET /api/investors/digest (one per project), PATCH /api/investors/digest/:slug */
export const InvestorDigestSettingSchema = z.object({
  project: ProjectRefSchema,
  enabled: z.boolean(),
  frequency: FrequencySchema,
  topics: TopicsSchema.nullable(),
  status: SubscriberStatusSchema.nullable(),
  options: TopicChoicesSchema,
});
export type InvestorDigestSetting = z.infer<typeof InvestorDigestSettingSchema>;

/** A topic filter or CSV topic: `area:Hall 2A` or `system:cooling`. */
export const TopicRefSchema = z.union([
  plainText({ trim: false }).regex(/^area:.{1,100}$/, "must look like area:Hall 2A or system:cooling"),
  z.templateLiteral(["system:", SystemSchema]),
]);

/** GET /api/subscribers and GET /api/subscribers/export.csv */
/** Which subscribers: the filters of the office list and of its CSV export (the export is never paged). */
export const SubscriberFilterQuerySchema = z.strictObject({
  projectSlug: ProjectSlugSchema.optional(),
  interest: InterestSchema.optional(),
  status: SubscriberStatusSchema.optional(),
  frequency: FrequencySchema.optional(),
  /** Subscribers who would receive this topic: those following it, and those following everything. */
  topic: TopicRefSchema.optional(),
  q: plainText().max(200).optional(),
});
export type SubscriberFilterQuery = z.infer<typeof SubscriberFilterQuerySchema>;

export const SUBSCRIBER_PAGE_SIZE = 50;

/** GET /api/subscribers: the filters and which page. */
export const SubscriberListQuerySchema = SubscriberFilterQuerySchema.extend(pageQueryShape(SUBSCRIBER_PAGE_SIZE));
export type SubscriberListQuery = z.infer<typeof SubscriberListQuerySchema>;

/** GET /api/subscribers */
export const SubscriberListSchema = z.object({
  /** This page's subscribers, newest first. */
  rows: z.array(SubscriberRowSchema),
  ...pageAnswerShape,
});
export type SubscriberList = z.infer<typeof SubscriberListSchema>;

/**
 * CSV columns for import, in this order in the header row. `topics` is `all` (or empty)
 * or `;`-separated topic refs. A row is confirmed on import only with both consent
 * columns (the time and where the consent was collected); otherwise it gets a
 * confirmation e-mail.
 */
export const SUBSCRIBER_IMPORT_COLUMNS = ["email", "name", "organisation", "interest", "frequency", "topics", "consent_at", "consent_source"] as const;
export const SUBSCRIBER_EXPORT_COLUMNS = [
  "email",
  "name",
  "organisation",
  "interest",
  "frequency",
  "topics",
  "status",
  "audience",
  "consent_at",
  "consent_source",
  "consent_version",
  "confirmed_at",
  "last_digest_at",
  "created_at",
] as const;
export const SUBSCRIBER_IMPORT_MAX_ROWS = 5000;

/** POST /api/subscribers/import */
export const SubscriberImportInputSchema = z.strictObject({
  projectSlug: ProjectSlugSchema,
  csv: multilineText({ error: "is required", trim: false }).min(1, "is empty").max(2_000_000, "is too large"),
});
export type SubscriberImportInput = z.infer<typeof SubscriberImportInputSchema>;

/** A line of an imported file, and why it was left out or refused. */
const ImportLineSchema = z.object({ line: z.number(), reason: z.string() });

/** POST /api/subscribers/import */
export const SubscriberImportResultSchema = z.object({
  imported: z.number(),
  /** Imported as confirmed on the file's consent evidence. */
  confirmedOnEvidence: z.number(),
  /** Sent a confirmation e-mail; receive nothing else until they confirm. */
  confirmationsSent: z.number(),
  /** Rows left out on purpose (already on the list, or suppressed), with their line numbers. */
  skipped: z.array(ImportLineSchema),
});
export type SubscriberImportResult = z.infer<typeof SubscriberImportResultSchema>;

/** Error body of a refused import (422, code `csv_invalid`): nothing was written. */
export const SubscriberImportErrorBodySchema = z.object({
  error: z.object({ code: z.literal("csv_invalid"), message: z.string(), rows: z.array(ImportLineSchema) }),
});
export type SubscriberImportErrorBody = z.infer<typeof SubscriberImportErrorBodySchema>;

/** DELETE /api/subscribers/:id — what was erased; the address stays suppressed. */
export const ErasureResultSchema = z.object({
  erased: z.object({ subscriptions: z.number(), enquiries: z.number() }),
  suppressed: z.literal(true),
});
export type ErasureResult = z.infer<typeof ErasureResultSchema>;

/**
 * POST /api/webhooks/mail-events — a hosted provider's delivery events, signed with the
 * shared secret (header `Plumbline-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of
 * "<t>.<raw body>">`). Only permanent bounces and complaints change anything.
 */
export const MailEventsInputSchema = z.strictObject({
  events: z
    .array(
      z.strictObject({
        id: plainText({ trim: false }).max(200).optional(),
        type: z.enum(["bounce", "complaint"]),
        email: EmailSchema,
        permanent: z.boolean().default(true),
        at: z.iso.datetime({ offset: true }).optional(),
      }),
    )
    .min(1, "send at least one event")
    .max(1000, "send at most 1000 events at once"),
});
export type MailEventsInput = z.infer<typeof MailEventsInputSchema>;

export const MailEventsResultSchema = z.object({ processed: z.number(), ignored: z.number() });
export type MailEventsResult = z.infer<typeof MailEventsResultSchema>;
