import type { Logger } from "../core/logger.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { DigestsService } from "./digests.service.ts";
import { sendTimes } from "./digests.windows.ts";

/** A scheduled run missed by more than this (the server was down) is not sent late. */
export const CATCH_UP_MS = 24 * 60 * 60 * 1000;
/** "As it happens" looks this far back for published posts without their e-mail. */
export const IMMEDIATE_LOOKBACK_MS = 60 * 60 * 1000;

/**
 * Creates the runs that are due: weekly (Monday 08:00 local, the previous ISO week), monthly
 * (first working day 08:00 local, the previous month) and one per newly published post. Each
 * period has one run whichever process creates it (unique run key), so every process may tick.
 */
export function createDigestScheduler(deps: { projects: ProjectsService; digests: DigestsService; logger: Logger; now?: () => Date }) {
  const { projects, digests, logger } = deps;
  const now = deps.now ?? (() => new Date());

  /** Weekly and monthly runs whose send time has come (within the catch-up limit). */
  async function tickPeriodic(at: Date = now()): Promise<number[]> {
    const created: number[] = [];
    for (const p of await projects.list()) {
      for (const frequency of ["weekly", "monthly"] as const) {
        const { due } = sendTimes(frequency, at, p.timeZone, p.settings);
        if (at.getTime() - due.getTime() > CATCH_UP_MS) continue;
        const r = await digests.createRun({ projectId: p.id, frequency, at: due, timeZone: p.timeZone });
        if (r.created) created.push(r.id);
      }
    }
    for (const id of created) await digests.planRun(id);
    return created;
  }

  /** One "as it happens" run per post published in the last hour that has none yet. */
  async function tickImmediate(at: Date = now()): Promise<number[]> {
    const created: number[] = [];
    for (const post of await digests.postsAwaitingImmediateRun(new Date(at.getTime() - IMMEDIATE_LOOKBACK_MS))) {
      const r = await digests.createRun({ projectId: post.projectId, frequency: "immediate", at, timeZone: "UTC", postId: post.id });
      if (r.created) created.push(r.id);
    }
    for (const id of created) await digests.planRun(id);
    return created;
  }

  async function tick(at: Date = now()): Promise<number[]> {
    const created = [...(await tickPeriodic(at)), ...(await tickImmediate(at))];
    if (created.length) logger.info({ runs: created }, "digest runs created");
    return created;
  }

  let timer: NodeJS.Timeout | null = null;
  let busy = false;
  return {
    tick,
    tickPeriodic,
    tickImmediate,
    start(everyMs = 60_000): void {
      timer = setInterval(() => {
        if (busy) return;
        busy = true;
        tick()
          .catch((err: unknown) => logger.error({ err }, "digest schedule failed"))
          .finally(() => {
            busy = false;
          });
      }, everyMs);
      timer.unref();
    },
    stop(): void {
      if (timer) clearInterval(timer);
      timer = null;
    },
  };
}
export type DigestScheduler = ReturnType<typeof createDigestScheduler>;
