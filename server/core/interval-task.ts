import type { Logger } from "./logger.ts";

export interface IntervalTask {
  start(): void;
  /** Stops the timer and waits for a pass under way. */
  stop(): Promise<void>;
}

/**
 * Runs `run` every `everyMs` in a worker process. A pass never overlaps the previous one
 * (a slow pass skips the ticks it outlasts), a failing pass is logged and tried again at the
 * next tick, and the timer does not keep the process alive on its own.
 */
export function createIntervalTask(opts: { name: string; everyMs: number; run: () => Promise<unknown>; logger: Logger }): IntervalTask {
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<void> | null = null;

  function pass(): void {
    if (running) return;
    running = opts
      .run()
      .then(
        () => undefined,
        (err: unknown) => opts.logger.error({ err, task: opts.name }, "background task failed; will try again"),
      )
      .finally(() => {
        running = null;
      });
  }

  return {
    start() {
      if (timer) return;
      timer = setInterval(pass, opts.everyMs);
      timer.unref();
    },
    async stop() {
      if (timer) clearInterval(timer);
      timer = null;
      await running;
    },
  };
}
