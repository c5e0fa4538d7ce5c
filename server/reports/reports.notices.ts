import { transactionalMail } from "../mail/mail.layout.ts";
import { formatMonthYear } from "#shared/domain/locale-dates.ts";
import type { ReportsContext } from "./reports.context.ts";
import { claimNotices, finishNotice, findReport, type ClaimedNotice } from "./reports.repository.ts";

const NOTICE_LEASE_MS = 2 * 60 * 1000;
const NOTICE_MAX_ATTEMPTS = 5;
const NOTICE_BATCH = 20;

/**
 * The notices of an issued report: one e-mail per reader, claimed under a lease (several workers
 * may run; SKIP LOCKED keeps them off each other's rows), sent with the Message-ID stored at issue
 * so that a sender interrupted after the relay accepted it learns from the sink and does not send
 * again. The mail carries a link into the investor room, never the file.
 */
export function createReportNotices(ctx: ReportsContext) {
  const { db, mailer, outbox, users, projects, logger, publicUrl, now } = ctx;

  async function send(n: ClaimedNotice): Promise<boolean> {
    const [report, people] = await Promise.all([findReport(db, n.reportId, { kind: "staff" }), users.list()]);
    const person = people.find((u) => u.id === n.userId);
    if (!report || !person || person.disabled) {
      await finishNotice(db, n.id, { status: "failed", error: !report ? "report gone" : "reader gone or disabled" });
      return false;
    }
    if (await outbox.accepted(n.messageId, person.email)) {
      await finishNotice(db, n.id, { status: "sent", sentAt: now() });
      return false;
    }
    const project = await projects.getById(report.projectId);
    const url = `${publicUrl}/investors/projects/${project.slug}/reports/${report.id}`;
    const month = formatMonthYear(report.month);
    const corrected = report.supersedesId !== null;
    const body = transactionalMail({
      heading: `${project.name}: the ${month} report${corrected ? " (corrected)" : ""} is issued`,
      paragraphs: [
        `${project.operatorName} has issued the monthly report for ${month}: where the build stood at the month end, the schedule, budget, facility, risks and decisions needed, with photographs.`,
        ...(corrected && report.correctionNote ? [`This issue corrects the earlier one: ${report.correctionNote}`] : []),
        "Open it in the investor room. The PDF there is marked for you.",
      ],
      action: { label: "Open the report", url },
      footer: `${project.name}. You receive this because you have an account in the investor room.`,
    });
    try {
      await mailer.send({ to: person.email, subject: `${project.name}: ${month} report issued`, ...body, headers: { "Message-ID": n.messageId } });
      await finishNotice(db, n.id, { status: "sent", sentAt: now() });
      return true;
    } catch (err) {
      const error = String((err as Error)?.message ?? err).replace(person.email, "<address>");
      // A temporary failure is tried again later, the wait doubling; after the last attempt it stays failed.
      await finishNotice(db, n.id, { status: n.attempts >= NOTICE_MAX_ATTEMPTS ? "failed" : "queued", error, retryAt: new Date(now().getTime() + 30_000 * 2 ** (n.attempts - 1)) });
      logger.warn({ noticeId: n.id, attempts: n.attempts }, "report notice not sent");
      return false;
    }
  }

  return {
    /** Sends every due notice; returns how many went. Safe from any process at any time. */
    async sendNotices(at: Date = now()): Promise<number> {
      let sent = 0;
      for (;;) {
        const batch = await claimNotices(db, at, NOTICE_LEASE_MS, NOTICE_BATCH);
        if (batch.length === 0) return sent;
        for (const n of batch) if (await send(n)) sent++;
      }
    },
  };
}
