import { z } from "zod";
import { EmailSchema } from "./common.ts";
import { SystemSchema, type System } from "./programme.ts";
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
export type SubscriberAudience = "public" | "investor";

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

export interface SubscriptionAccepted {
  ok: true;
  message: string;
}

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

/** GET /api/projects/:slug/subscription-options */
export interface SubscriptionOptions {
  project: { slug: string; name: string; operatorName: string };
  consent: { version: string; text: string };
  /** Areas named by the project's public programme. */
  areas: string[];
  systems: System[];
}

/** GET /api/subscriptions/confirm/:token — describes the link; changes nothing. */
export interface ConfirmationView {
  email: string;
  name: string;
  project: { slug: string; name: string };
  status: SubscriberStatus;
  consent: { version: string; text: string };
}

export interface ConfirmationDone {
  status: "confirmed";
  /** The subscriber's own preferences page (same-site path). */
  preferencesPath: string;
}

export interface PreferencesView {
  email: string;
  name: string;
  organisation: string | null;
  interest: Interest;
  frequency: Frequency;
  topics: Topics | null;
  status: SubscriberStatus;
  project: { slug: string; name: string };
  options: { areas: string[]; systems: System[] };
}

export interface UnsubscribeView {
  email: string;
  project: { slug: string; name: string };
  status: SubscriberStatus;
}

export interface InvestorDigestSetting {
  project: { slug: string; name: string };
  enabled: boolean;
  frequency: Frequency;
  topics: Topics | null;
  status: SubscriberStatus | null;
  options: { areas: string[]; systems: System[] };
}

/** A topic filter or CSV topic: `area:Hall 2A` or `system:cooling`. */
export const TopicRefSchema = z.union([
  plainText({ trim: false }).regex(/^area:.{1,100}$/, "must look like area:Hall 2A or system:cooling"),
  z.templateLiteral(["system:", SystemSchema]),
]);

/** GET /api/subscribers and GET /api/subscribers/export.csv */
export const SubscriberListQuerySchema = z.strictObject({
  projectSlug: ProjectSlugSchema.optional(),
  interest: InterestSchema.optional(),
  status: SubscriberStatusSchema.optional(),
  frequency: FrequencySchema.optional(),
  /** Subscribers who would receive this topic: those following it, and those following everything. */
  topic: TopicRefSchema.optional(),
  q: plainText().max(200).optional(),
});
export type SubscriberListQuery = z.infer<typeof SubscriberListQuerySchema>;

export interface SubscriberRow {
  id: number;
  project: { slug: string; name: string };
  email: string;
  name: string;
  organisation: string | null;
  interest: Interest;
  audience: SubscriberAudience;
  frequency: Frequency;
  topics: Topics | null;
  status: SubscriberStatus;
  /** Linked to an investor account (set in the investor room). */
  account: boolean;
  consentAt: string | null;
  consentSource: string | null;
  consentVersion: string | null;
  confirmedAt: string | null;
  lastDigestAt: string | null;
  createdAt: string;
}

export interface SubscriberList {
  rows: SubscriberRow[];
  /** Every match; `rows` holds at most the first SUBSCRIBER_LIST_LIMIT. */
  total: number;
}
export const SUBSCRIBER_LIST_LIMIT = 500;

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

export interface SubscriberImportResult {
  imported: number;
  /** Imported as confirmed on the file's consent evidence. */
  confirmedOnEvidence: number;
  /** Sent a confirmation e-mail; receive nothing else until they confirm. */
  confirmationsSent: number;
  /** Rows left out on purpose (already on the list, or suppressed), with their line numbers. */
  skipped: Array<{ line: number; reason: string }>;
}

/** Error body of a refused import (422, code `csv_invalid`): nothing was written. */
export interface SubscriberImportErrorBody {
  error: { code: "csv_invalid"; message: string; rows: Array<{ line: number; reason: string }> };
}

export interface ErasureResult {
  erased: { subscriptions: number; enquiries: number };
  suppressed: true;
}

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

export interface MailEventsResult {
  processed: number;
  ignored: number;
}
