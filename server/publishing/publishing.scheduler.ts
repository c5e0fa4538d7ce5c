import type { Logger } from "../core/logger.ts";

/** What the ticker needs of a module with scheduled publication (posts, photo stories). */
export interface DuePublisher {
  publishDue(at?: Date): Promise<{ published: number[]; heldBack: number[] }>;
}

export interface PublishingTicker {
  start(): void;
  stop(): Promise<void>;
  /** One pass now (what each tick does); `at` stands in for the clock (tests). */
  tick(at?: Date): Promise<void>;
}

/**
 * Publishes due scheduled content every `intervalMs`: one pass asks each source in turn
 * (`{ posts, stories }`), and a source that fails is logged without stopping the others.
 * Every process may run one: each service's claim skips rows another process holds, so an
 * item is published once. A pass never overlaps the previous one in this process.
 */
export function createPublishingTicker(sources: Readonly<Record<string, DuePublisher>>, logger: Logger, intervalMs = 30_000): PublishingTicker {
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<void> | null = null;

  async function tick(at?: Date): Promise<void> {
    if (running) return running;
    running = (async () => {
      try {
        for (const [kind, source] of Object.entries(sources)) {
          try {
            const { published, heldBack } = await source.publishDue(at);
            if (published.length || heldBack.length) logger.info({ kind, published, heldBack }, "scheduled publication");
          } catch (err) {
            logger.error({ err, kind }, "scheduled publication failed; will try again");
          }
        }
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
