import type { Knex } from "knex";
import type { EnquiryInput, EnquiryListQuery, EnquiryOwner, EnquiryPatch, EnquiryRow } from "#shared/schemas/enquiries.ts";
import { STAFF_ROLES } from "#shared/schemas/common.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import type { UsersService } from "../users/users.service.ts";
import { enquiryNotification } from "./enquiries.mail.ts";
import { deleteEnquiriesByEmail, findEnquiry, insertEnquiry, listEnquiries, listEnquiriesByEmail, updateEnquiry, type EnquiryRecord } from "./enquiries.repository.ts";

export const ENQUIRY_ACCEPTED = {
  ok: true,
  message: "Thank you. Your enquiry has reached the operator's team, who will reply by e-mail, usually within two working days.",
} as const;

export function createEnquiriesService(deps: {
  db: Db;
  mailer: Mailer;
  logger: Logger;
  /** Each enquiry's project by id, and the project a list is filtered by. */
  projects: ProjectsService;
  users: Pick<UsersService, "list">;
  /** The names of the staff enquiries are given to. */
  accounts: Pick<AccountsService, "namesOf">;
  publicUrl: string;
  now?: () => Date;
}) {
  const { db, mailer, logger, projects, users, accounts, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());

  /** Enquiries as the office reads them, naming each one's project and owner: one read of each for the whole list. */
  async function present(records: readonly EnquiryRecord[]): Promise<EnquiryRow[]> {
    if (records.length === 0) return [];
    const [byId, names] = await Promise.all([
      projects.byIds(records.map((r) => r.projectId)),
      accounts.namesOf([...new Set(records.flatMap((r) => (r.ownerId === null ? [] : [r.ownerId])))]),
    ]);
    // An enquiry goes with its project (deleting a project deletes them), so every one finds it.
    return records.flatMap(({ projectId, ownerId, ...r }) => {
      const project = byId.get(projectId);
      if (!project) return [];
      return [
        {
          ...r,
          project: { slug: project.slug, name: project.name },
          // A deleted owner's name reads as empty, as it always has.
          owner: ownerId === null ? null : { id: ownerId, name: names.get(ownerId) ?? "" },
        },
      ];
    });
  }

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

    async list(f: EnquiryListQuery): Promise<EnquiryRow[]> {
      // A slug that names no project matches no enquiry: an empty list, not an error.
      const project = f.projectSlug ? await projects.findBySlug(f.projectSlug) : undefined;
      if (project === null) return [];
      return present(await listEnquiries(db, { status: f.status, kind: f.kind, projectId: project?.id }));
    },

    async get(id: number): Promise<EnquiryRow> {
      const found = await findEnquiry(db, id);
      const [e] = found ? await present([found]) : [];
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
      return (await present([(await findEnquiry(db, id))!]))[0]!;
    },

    /** For a person's data export. */
    listByEmail: async (email: string): Promise<EnquiryRow[]> => present(await listEnquiriesByEmail(db, email.trim().toLowerCase())),
    /** For erasure, inside the caller's transaction. */
    eraseByEmail: (email: string, trx?: Knex.Transaction) => deleteEnquiriesByEmail(trx ?? db, email.trim().toLowerCase()),
  };
}
export type EnquiriesService = ReturnType<typeof createEnquiriesService>;
