import { z } from "zod";
import { CalendarDateSchema, EmailSchema, NamedSchema, STAFF_ROLES } from "./common.ts";
import { ProjectRefSchema } from "./projects.ts";
import { multilineText, plainText } from "./text.ts";

/**
 * The HTTP contract of the enquiries module (server/enquiries ↔ src/features/enquiries):
 * a prospect asks about capacity, asks for a site visit or asks a question; marketing
 * works the enquiries in the site office.
 */

export const EnquiryKindSchema = z.enum(["capacity", "visit", "general"]);
export type EnquiryKind = z.infer<typeof EnquiryKindSchema>;
export const EnquiryStatusSchema = z.enum(["new", "contacted", "closed"]);
export type EnquiryStatus = z.infer<typeof EnquiryStatusSchema>;

/** Largest party on one escorted visit (site rules: escorted at all times). */
export const VISIT_MAX_PARTY = 6;

const contact = {
  name: plainText({ error: "is required" }).min(1, "is required").max(200, "must be at most 200 characters"),
  email: EmailSchema,
  organisation: plainText().max(200, "must be at most 200 characters").optional(),
  phone: plainText()
    .max(40, "must be at most 40 characters")
    .regex(/^$|^[+()0-9 .-]{6,40}$/, "must be a telephone number: digits, spaces, + ( ) . -")
    .optional(),
  /**
   * The honeypot: hidden from people, tempting to form-filling robots. An enquiry that
   * fills it gets the ordinary answer, and nothing is kept or sent. It takes any text, control
   * characters included: refusing some would tell a robot which field is the trap.
   */
  website: z.string().max(500).optional(),
};

const Message = multilineText().max(4000, "must be at most 4000 characters");

export const CapacityEnquirySchema = z.strictObject({
  kind: z.literal("capacity"),
  ...contact,
  message: Message.optional(),
  racks: z.number({ error: "must be a whole number of racks" }).int("must be a whole number of racks").min(1, "must be at least 1").max(5000, "must be at most 5000"),
  kwPerRack: z.number({ error: "must be a number of kW" }).min(0.5, "must be at least 0.5 kW").max(200, "must be at most 200 kW"),
  neededBy: CalendarDateSchema,
});

export const VisitEnquirySchema = z.strictObject({
  kind: z.literal("visit"),
  ...contact,
  message: Message.optional(),
  preferredDates: z.array(CalendarDateSchema).min(1, "give at least one date").max(3, "give at most three dates"),
  partySize: z
    .number({ error: "must be a number of people" })
    .int("must be a whole number of people")
    .min(1, "must be at least 1")
    .max(VISIT_MAX_PARTY, `must be at most ${VISIT_MAX_PARTY}: larger groups are arranged separately`),
  rulesAccepted: z.literal(true, { error: "confirm that you have read the site rules" }),
});

export const GeneralEnquirySchema = z.strictObject({
  kind: z.literal("general"),
  ...contact,
  message: Message.min(10, "say a little more (at least 10 characters)"),
});

/** POST /api/projects/:slug/enquiries → 202, the same answer for every accepted-looking enquiry. */
export const EnquiryInputSchema = z.discriminatedUnion("kind", [CapacityEnquirySchema, VisitEnquirySchema, GeneralEnquirySchema]);
export type EnquiryInput = z.infer<typeof EnquiryInputSchema>;

export const EnquiryAcceptedSchema = z.object({ ok: z.literal(true), message: z.string() });
export type EnquiryAccepted = z.infer<typeof EnquiryAcceptedSchema>;

/** GET /api/enquiries */
export const EnquiryListQuerySchema = z.strictObject({
  status: EnquiryStatusSchema.optional(),
  kind: EnquiryKindSchema.optional(),
  projectSlug: plainText({ trim: false }).max(100).optional(),
});
export type EnquiryListQuery = z.infer<typeof EnquiryListQuerySchema>;

/** PATCH /api/enquiries/:id */
export const EnquiryPatchSchema = z
  .strictObject({
    status: EnquiryStatusSchema.optional(),
    ownerId: z.number().int().positive().nullable().optional(),
    notes: multilineText({ trim: false }).max(10_000, "must be at most 10,000 characters").optional(),
  })
  .refine((v) => v.status !== undefined || v.ownerId !== undefined || v.notes !== undefined, { message: "change at least one thing" });
export type EnquiryPatch = z.infer<typeof EnquiryPatchSchema>;

/** GET /api/enquiries (a list of these), GET and PATCH /api/enquiries/:id. */
export const EnquiryRowSchema = z.object({
  id: z.number(),
  project: ProjectRefSchema,
  kind: EnquiryKindSchema,
  name: z.string(),
  email: z.string(),
  organisation: z.string().nullable(),
  phone: z.string().nullable(),
  message: z.string().nullable(),
  racks: z.number().nullable(),
  kwPerRack: z.number().nullable(),
  neededBy: z.string().nullable(),
  preferredDates: z.array(z.string()),
  partySize: z.number().nullable(),
  status: EnquiryStatusSchema,
  owner: NamedSchema.nullable(),
  notes: z.string(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type EnquiryRow = z.infer<typeof EnquiryRowSchema>;

/** GET /api/enquiries/owners — the staff an enquiry can be given to. */
export const EnquiryOwnerSchema = z.object({ id: z.number(), name: z.string(), role: z.enum(STAFF_ROLES) });
export type EnquiryOwner = z.infer<typeof EnquiryOwnerSchema>;
