import type { Knex } from "knex";
import type { EnquiryInput, EnquiryListQuery, EnquiryOwner, EnquiryPatch, EnquiryRow } from "#shared/schemas/enquiries.ts";
import { STAFF_ROLES } from "#shared/schemas/common.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { UsersService } from "../users/users.service.ts";
import { enquiryNotification } from "./enquiries.mail.ts";
import { deleteEnquiriesByEmail, findEnquiry, insertEnquiry, listEnquiries, listEnquiriesByEmail, updateEnquiry } from "./enquiries.repository.ts";

export const ENQUIRY_ACCEPTED = {
  ok: true,
  message: "Thank you. Your enquiry has reached the operator's team, who will reply by e-mail, usually within two working days.",
} as const;

export function createEnquiriesService(deps: {
  db: Db;
  mailer: Mailer;
  logger: Logger;
  projects: ProjectsService;
  users: Pick<UsersService, "list">;
  publicUrl: string;
  now?: () => Date;
}) {
  const { db, mailer, logger, projects, users, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());

  async function owners(): Promise<EnquiryOwner[]> {
    return (await users.list())
      .filter((u) => !u.disabled && (STAFF_ROLES as readonly string[]).includes(u.role))
      .map((u) => ({ id: u.id, name: u.name, role: u.role as EnquiryOwner["role"] }));
  }

  /** One message per marketing user; a failure is logged, and the enquiry waits in the list regardless. */
  async function notifyMarketing(projectName: string, enquiry: EnquiryInput, id: number): Promise<void> {
    const to = (await users.list()).filter((u) => u.role === "marketing" && !u.disabled);
    const mail = enquiryNotification({ projectName, enquiry, url: `${publicUrl}/office/enquiries?open=${id}` });
    for (const u of to) {
      try {
        await mailer.send({ to: u.email, ...mail, headers: { "Reply-To": enquiry.email } });
      } catch (err) {
        logger.error({ err, enquiryId: id }, "could not e-mail marketing about an enquiry");
      }
    }
  }

  return {
    /**
     * Keeps the enquiry and e-mails marketing after the answer. A filled honeypot gets the
     * same answer and nothing is kept or sent. No copy goes to the given address: the
     * form must not become a way to send mail to strangers.
     */
    async submit(slug: string, input: EnquiryInput, actor: Actor): Promise<void> {
      const project = await projects.get(slug);
      if (input.website) {
        logger.info({ projectId: project.id, ip: actor.ip }, "enquiry with the honeypot filled; dropped");
        return;
      }
      const today = projects.today(project);
      if (input.kind === "visit") {
        if (!project.visitsOffered) throw new AppError("visits_not_offered", "Site visits are not offered for this project at present.", 422);
        const early = input.preferredDates.filter((d) => d <= today);
        if (early.length) throw new AppError("validation", "Check preferredDates.", 400, { preferredDates: `must be after today (${today}, site time)` });
      }
      if (input.kind === "capacity" && input.neededBy < today) {
        throw new AppError("validation", "Check neededBy.", 400, { neededBy: `must not be before today (${today}, site time)` });
      }
      const id = await insertEnquiry(db, {
        projectId: project.id,
        kind: input.kind,
        name: input.name,
        email: input.email,
        organisation: input.organisation || null,
        phone: input.phone || null,
        message: input.message || null,
        racks: input.kind === "capacity" ? input.racks : null,
        kwPerRack: input.kind === "capacity" ? input.kwPerRack : null,
        neededBy: input.kind === "capacity" ? input.neededBy : null,
        preferredDates: input.kind === "visit" ? [...new Set(input.preferredDates)].sort() : null,
        partySize: input.kind === "visit" ? input.partySize : null,
        rulesAcceptedAt: input.kind === "visit" ? now() : null,
        ip: actor.ip,
      });
      void notifyMarketing(project.name, input, id).catch((err: unknown) => logger.error({ err, enquiryId: id }, "enquiry notification failed"));
    },

    list: (f: EnquiryListQuery) => listEnquiries(db, f),

    async get(id: number): Promise<EnquiryRow> {
      const e = await findEnquiry(db, id);
      if (!e) throw notFound("That enquiry");
      return e;
    },

    owners,

    async update(id: number, patch: EnquiryPatch): Promise<EnquiryRow> {
      if (patch.ownerId != null && !(await owners()).some((o) => o.id === patch.ownerId)) {
        throw new AppError("owner_invalid", "An enquiry can be given only to an active member of staff.", 422, { ownerId: "is not an active member of staff" });
      }
      await db.transaction(async (trx) => {
        const e = await findEnquiry(trx, id, true);
        if (!e) throw notFound("That enquiry");
        await updateEnquiry(trx, id, patch, now());
      });
      return (await findEnquiry(db, id))!;
    },

    /** For a person's data export. */
    listByEmail: (email: string) => listEnquiriesByEmail(db, email.trim().toLowerCase()),
    /** For erasure, inside the caller's transaction. */
    eraseByEmail: (email: string, trx?: Knex.Transaction) => deleteEnquiriesByEmail(trx ?? db, email.trim().toLowerCase()),
  };
}
export type EnquiriesService = ReturnType<typeof createEnquiriesService>;
