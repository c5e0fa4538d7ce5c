import { randomBytes } from "node:crypto";
import type { DigestPreview, DigestTestInput } from "#shared/schemas/digests.ts";
import { AppError } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { SubscribersService } from "../subscribers/subscribers.service.ts";
import type { DigestAssembler } from "./digests.assemble.ts";
import { lastFiguresOf } from "./digests.repository.ts";
import { hasNews, personalise, renderDigest } from "./digests.render.ts";
import { currentPeriodStart } from "./digests.windows.ts";

export interface DigestPreviewDeps {
  db: Db;
  mailer: Mailer;
  projects: Pick<ProjectsService, "get" | "sender">;
  subscribers: Pick<SubscribersService, "digestReader">;
  assembler: DigestAssembler;
  publicUrl: string;
  /** The host part of every Message-ID. */
  host: string;
  now: () => Date;
}

/** The office's looks at a digest before it goes: one subscriber's next digest, and a test send to oneself. */
export function createDigestPreview(deps: DigestPreviewDeps) {
  const { db, mailer, projects, subscribers, assembler, publicUrl, host, now } = deps;

  /** What a subscriber would receive if their digest ran now: their window to now, their audience and topics. */
  async function preview(subscriberId: number): Promise<DigestPreview> {
    const s = await subscribers.digestReader(subscriberId);
    const project = await projects.sender(s.projectId);
    const { audience, topics, frequency } = s;
    const end = now();
    // Their next digest as it stands: from where their last one ended (else from the start of
    // the period in progress, as the run would) to now.
    const periodStart = currentPeriodStart(frequency === "monthly" ? "monthly" : "weekly", end, project.timeZone);
    const windowStart = s.lastDigestAt ? new Date(s.lastDigestAt) : frequency === "immediate" ? new Date(end.getTime() - 7 * 86_400_000) : periodStart;
    const previous = (await lastFiguresOf(db, [subscriberId])).get(subscriberId) ?? null;
    // The preview shows a digest's contents, so "as it happens" subscribers see a week's worth.
    const doc = await assembler.assemble({ project, frequency: frequency === "immediate" ? "weekly" : frequency, audience, topics, windowStart, windowEnd: end, soFar: true, previous });
    const rendered = await renderDigest(doc);
    const links = { webUrl: "#", preferencesUrl: "#", unsubscribeUrl: "#" };
    return {
      subscriber: { id: subscriberId, email: s.email, audience, frequency },
      windowStart: windowStart.toISOString(),
      windowEnd: end.toISOString(),
      wouldSend: hasNews(doc),
      subject: rendered.subject,
      preheader: rendered.preheader,
      html: personalise(rendered.html, links),
      text: personalise(rendered.text, links),
    };
  }

  /** Sends the current week's digest so far (Monday 00:00 in the project's zone to now) to the signed-in member of staff, at once. */
  async function sendTest(input: DigestTestInput, actor: Actor): Promise<{ messageId: string }> {
    if (!actor.user) throw new AppError("unauthenticated", "Sign in first.", 401);
    const project = await projects.get(input.projectSlug);
    const end = now();
    const start = currentPeriodStart("weekly", end, project.timeZone);
    const doc = await assembler.assemble({ project: await projects.sender(project.id), frequency: "weekly", audience: input.audience, topics: null, windowStart: start, windowEnd: end, soFar: true, previous: null });
    const r = await renderDigest(doc);
    const links = { webUrl: `${publicUrl}/office/digests`, preferencesUrl: `${publicUrl}/office/digests`, unsubscribeUrl: `${publicUrl}/office/digests` };
    const messageId = `<digest.test.${randomBytes(8).toString("hex")}@${host}>`;
    await mailer.send({ to: actor.user.email, subject: `[Test] ${r.subject}`, html: personalise(r.html, links), text: personalise(r.text, links), headers: { "Message-ID": messageId } });
    return { messageId };
  }

  return { preview, sendTest };
}
