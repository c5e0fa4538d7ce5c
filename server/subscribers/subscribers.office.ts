import { pageWindow } from "#shared/schemas/paging.ts";
import {
  type ErasureResult,
  type SubscriberImportInput,
  type SubscriberImportResult,
  type SubscriberFilterQuery,
  type SubscriberList,
  type SubscriberListQuery,
  type SubscriberRow,
} from "#shared/schemas/subscribers.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { SubscriberProject, SubscribersContext } from "./subscribers.context.ts";
import { parseSubscriberCsv, subscribersToCsv } from "./subscribers.csv.ts";
import {
  deleteSubscribersByEmailHash,
  enqueueMailJobs,
  findSubscriberById,
  findSuppression,
  insertSubscriber,
  insertSuppression,
  listMailJobsOf,
  listProjectEmails,
  listSubscribers,
  listSubscribersByEmailHash,
  suppressedAmong,
  type SubscriberFilter,
  type SubscriberRecord,
} from "./subscribers.repository.ts";
import { hashAddress, newNonce } from "./subscribers.tokens.ts";
import { topicsKey } from "./subscribers.topics.ts";

/** A subscriber as the site office lists them. */
function toRow(s: SubscriberRecord & { project: SubscriberProject }): SubscriberRow {
  return {
    id: s.id,
    project: { slug: s.project.slug, name: s.project.name },
    email: s.email,
    name: s.name,
    organisation: s.organisation,
    interest: s.interest,
    audience: s.audience,
    frequency: s.frequency,
    topics: s.topics,
    status: s.status,
    account: s.userId !== null,
    consentAt: s.consentAt?.toISOString() ?? null,
    consentSource: s.consentSource,
    consentVersion: s.consentVersion,
    confirmedAt: s.confirmedAt?.toISOString() ?? null,
    lastDigestAt: s.lastDigestAt?.toISOString() ?? null,
    createdAt: s.createdAt.toISOString(),
  };
}

/**
 * The site office's list of subscribers, and personal data: list, export, import, a person's
 * data, erasure. `sendQueuedMail` starts sending the confirmations an import queued.
 */
export function createSubscriberOffice(ctx: SubscribersContext, sendQueuedMail: () => void) {
  const { db, projects, programme, enquiries, now, withProjects } = ctx;
  const kick = sendQueuedMail;

  /** The filters with the project slug resolved to its id; null when the slug names no project (nothing matches). */
  async function resolveFilter({ projectSlug, ...rest }: SubscriberFilterQuery): Promise<SubscriberFilter | null> {
    if (!projectSlug) return rest;
    const project = await projects.findBySlug(projectSlug);
    return project ? { ...rest, projectId: project.id } : null;
  }

  return {
    /** One page of the matching subscribers, newest first, and how many match in all. */
    async list({ page, pageSize, ...f }: SubscriberListQuery): Promise<SubscriberList> {
      const filter = await resolveFilter(f);
      if (!filter) return { rows: [], total: 0, page, pageSize };
      const { rows, total } = await listSubscribers(db, filter, pageWindow({ page, pageSize }));
      return { rows: (await withProjects(rows)).map(toRow), total, page, pageSize };
    },

    /** Every matching subscriber (never paged). The export names no project, so it reads none. */
    async exportCsv(f: SubscriberFilterQuery): Promise<string> {
      const filter = await resolveFilter(f);
      const { rows } = filter ? await listSubscribers(db, filter, null) : { rows: [] };
      return subscribersToCsv(rows);
    },

    /**
     * Checks every row first and imports nothing when any is bad. Rows with consent
     * evidence (time and source) are confirmed; the rest are sent a confirmation and
     * receive nothing else until they confirm. Addresses already on the list, and
     * suppressed ones (erased, bounced, complained), are left out and listed.
     */
    async importCsv(input: SubscriberImportInput): Promise<SubscriberImportResult> {
      const project = await projects.get(input.projectSlug);
      const t = now();
      const { rows, problems } = parseSubscriberCsv(input.csv, { allowedAreas: new Set(await programme.publicAreas(project.id)), now: t });
      if (problems.length) {
        throw new AppError(
          "csv_invalid",
          `${problems.length === 1 ? "One row has a problem" : `${problems.length} rows have problems`}; nothing was imported. Correct the file and import it again.`,
          422,
          undefined,
          { rows: problems },
        );
      }
      const result = await db.transaction(async (trx) => {
        const existing = await listProjectEmails(trx, project.id);
        const suppressed = await suppressedAmong(trx, rows.map((r) => hashAddress(r.email)));
        const skipped: SubscriberImportResult["skipped"] = [];
        const pendingIds: number[] = [];
        let confirmedOnEvidence = 0;
        for (const r of rows) {
          const emailHash = hashAddress(r.email);
          if (suppressed.has(emailHash)) {
            skipped.push({ line: r.line, reason: "on the suppression list (erased, bounced or reported as spam); not imported" });
            continue;
          }
          if (existing.has(r.email)) {
            skipped.push({ line: r.line, reason: "already on this project's list; left as it is" });
            continue;
          }
          const common = { projectId: project.id, email: r.email, emailHash, name: r.name, organisation: r.organisation, interest: r.interest, frequency: r.frequency, topics: r.topics, topicsKey: topicsKey(r.topics) };
          if (r.consent) {
            await insertSubscriber(trx, { ...common, status: "confirmed", confirmedAt: t, statusChangedAt: t, consentAt: r.consent.at, consentSource: `import: ${r.consent.source}`, consentVersion: "import" });
            confirmedOnEvidence++;
          } else {
            pendingIds.push(await insertSubscriber(trx, { ...common, status: "pending", confirmNonce: newNonce(), pendingSince: t, consentSource: "import" }));
          }
        }
        await enqueueMailJobs(trx, pendingIds, "confirmation", t);
        return { imported: confirmedOnEvidence + pendingIds.length, confirmedOnEvidence, confirmationsSent: pendingIds.length, skipped };
      });
      if (result.confirmationsSent > 0) kick();
      return result;
    },

    /** Everything kept about the person behind one subscription, across projects, as JSON. */
    async personData(id: number) {
      const s = await findSubscriberById(db, id);
      if (!s) throw notFound("That subscriber");
      const all = await withProjects(await listSubscribersByEmailHash(db, s.emailHash));
      const suppression = await findSuppression(db, s.emailHash);
      return {
        exportedAt: now().toISOString(),
        email: s.email,
        subscriptions: all.map((x) => ({
          ...toRow(x),
          consentIp: x.consentIp,
          confirmIp: x.confirmIp,
          unsubscribedAt: x.unsubscribedAt?.toISOString() ?? null,
          statusChangedAt: x.statusChangedAt?.toISOString() ?? null,
        })),
        mail: await listMailJobsOf(db, all.map((x) => x.id)),
        enquiries: await enquiries.listByEmail(s.email),
        suppression: suppression ? { reason: suppression.reason, since: suppression.createdAt.toISOString() } : null,
      };
    },

    /**
     * Erasure: every subscription and enquiry of the address goes; only the address's
     * hash stays, on the suppression list, so it is not imported or subscribed again.
     */
    async erase(id: number): Promise<ErasureResult> {
      const s = await findSubscriberById(db, id);
      if (!s) throw notFound("That subscriber");
      return db.transaction(async (trx) => {
        const subscriptions = await deleteSubscribersByEmailHash(trx, s.emailHash);
        const enquiriesErased = await enquiries.eraseByEmail(s.email, trx);
        await insertSuppression(trx, { emailHash: s.emailHash, reason: "erased", source: "erasure" });
        return { erased: { subscriptions, enquiries: enquiriesErased }, suppressed: true as const };
      });
    },
  };
}
