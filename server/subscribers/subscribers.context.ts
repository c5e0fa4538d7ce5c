import type { Knex } from "knex";
import { SystemSchema } from "#shared/schemas/programme.ts";
import type { SubscriptionOptions, Topics } from "#shared/schemas/subscribers.ts";
import { AppError } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import type { EnquiriesService } from "../enquiries/enquiries.service.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { createAccountsService, type AccountsService } from "../users/users.accounts.ts";
import { subscriberLinks, type SubscriberLinks } from "./subscribers.links.ts";
import { findSubscriberById, type SubscriberRecord } from "./subscribers.repository.ts";
import { verifyToken } from "./subscribers.tokens.ts";

export interface SubscribersDeps {
  db: Db;
  mailer: Mailer;
  logger: Logger;
  projects: ProjectsService;
  /** The areas subscribers may choose come from the public programme. */
  programme: Pick<ProgrammeService, "publicAreas">;
  enquiries: Pick<EnquiriesService, "listByEmail" | "eraseByEmail">;
  publicUrl: string;
  tokenSecret: string;
  unsubscribeMailto: string | null;
  webhookSecret: string | null;
  /** The users module's accounts (is an investor's account still active); by default one over `db`. */
  accounts?: Pick<AccountsService, "disabledAmong">;
  now?: () => Date;
}

/** A subscription's project as its pages and e-mails name it (the projects module's sender). */
export type SubscriberProject = Awaited<ReturnType<ProjectsService["sender"]>>;

/**
 * What the subscribers' use cases (subscribers.lifecycle, .office, .mail-queue, .bounces) share:
 * their dependencies, the clock, and the checks and links every one of them needs.
 */
export function createSubscribersContext(deps: SubscribersDeps) {
  const { db, programme, projects, publicUrl, tokenSecret, unsubscribeMailto } = deps;
  const now = deps.now ?? (() => new Date());

  return {
    ...deps,
    accounts: deps.accounts ?? createAccountsService({ db }),
    now,

    /** Refuses topics naming an area the project's public programme does not have. */
    async checkAreas(projectId: number, topics: Topics | null, field: string): Promise<void> {
      if (!topics || topics.areas.length === 0) return;
      const known = new Set(await programme.publicAreas(projectId));
      const unknown = topics.areas.filter((a) => !known.has(a));
      if (unknown.length) {
        throw new AppError("validation", `Check ${field}.`, 400, { [field]: `${unknown.map((a) => `"${a}"`).join(", ")} is not an area of this project` });
      }
    },

    /** The areas and systems a subscriber of the project may choose. */
    async optionsFor(projectId: number): Promise<Pick<SubscriptionOptions, "areas" | "systems">> {
      return { areas: await programme.publicAreas(projectId), systems: [...SystemSchema.options] };
    },

    /** The subscriber a signed link names (locked when read in a transaction); 404 when gone. */
    async subscriberFor(token: string, purpose: "confirm" | "preferences" | "unsubscribe", trx?: Knex.Transaction) {
      const t = verifyToken(tokenSecret, token, purpose, now());
      const s = await findSubscriberById(trx ?? db, t.subscriberId, Boolean(trx));
      if (!s) throw new AppError("not_found", "This link belongs to a subscription that no longer exists.", 404);
      return { s, t };
    },

    /**
     * Each subscriber with its project, the projects read in one call for the whole list. A
     * subscriber whose project has just gone is left out, as it goes with its project.
     */
    async withProjects<T extends Pick<SubscriberRecord, "projectId">>(rows: readonly T[]): Promise<Array<T & { project: SubscriberProject }>> {
      if (rows.length === 0) return [];
      const senders = await projects.senders(rows.map((r) => r.projectId));
      return rows.flatMap((r) => {
        const project = senders.get(r.projectId);
        return project ? [{ ...r, project }] : [];
      });
    },

    linksFor(s: Pick<SubscriberRecord, "id">): SubscriberLinks {
      return subscriberLinks({ publicUrl, secret: tokenSecret, mailto: unsubscribeMailto, subscriberId: s.id, now: now() });
    },
  };
}
export type SubscribersContext = ReturnType<typeof createSubscribersContext>;
