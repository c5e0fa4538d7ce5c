import type { Logger } from "../core/logger.ts";
import type { PostsService } from "./posts.service.ts";

export interface PublishingTicker {
  start(): void;
  stop(): Promise<void>;
  /** One pass now (what each tick does). */
  tick(): Promise<void>;
}

/**
 * Publishes due scheduled posts every `intervalMs`. Every process may run one: the claim in
 * the service skips rows another process holds, so a post is published once. A pass never
 * overlaps the previous one in this process.
 */
export function createPublishingTicker(posts: Pick<PostsService, "publishDue">, logger: Logger, intervalMs = 30_000): PublishingTicker {
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<void> | null = null;

  async function tick(): Promise<void> {
    if (running) return running;
    running = (async () => {
      try {
        const { published, heldBack } = await posts.publishDue();
        if (published.length || heldBack.length) logger.info({ published, heldBack }, "scheduled publication");
      } catch (err) {
        logger.error({ err }, "scheduled publication failed; will try again");
      } finally {
        running = null;
      }
    })();
    return running;
  }

  return {
    tick,
    start() {
      if (timer) return;
      timer = setInterval(() => void tick(), intervalMs);
      timer.unref();
      void tick();
    },
    async stop() {
      if (timer) clearInterval(timer);
      timer = null;
      await running;
    },
  };
}
