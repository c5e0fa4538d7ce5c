import type { Express } from "express";
import { createHttpApp } from "../../server/app.ts";
import { createServices, type ServiceDeps, type Services } from "../../server/services.ts";
import { createWorkers, type Workers } from "../../server/workers.ts";

/**
 * Every service, the HTTP app and the background work, built as a process running both roles
 * builds them but with nothing started: tests call the parts (`publishing.tick(at)`,
 * `digestJobs.drain()`, `mediaJobs.start()` …) themselves.
 */
export type PlumblineApp = Services &
  Pick<Workers, "mediaJobs" | "publishing" | "digestJobs" | "digestSchedule"> & {
    app: Express;
    workers: Workers;
    /** Stops the background work a test started and the sends that requests set going. */
    close(): Promise<void>;
  };

export function createPlumbline(deps: ServiceDeps): PlumblineApp {
  const services = createServices(deps);
  const workers = createWorkers(services, deps);
  const { mediaJobs, publishing, digestJobs, digestSchedule } = workers;
  return {
    ...services,
    app: createHttpApp(services, deps),
    workers,
    mediaJobs,
    publishing,
    digestJobs,
    digestSchedule,
    async close() {
      await workers.stop();
      // A test may have started the schedule itself.
      digestSchedule.stop();
      services.close();
    },
  };
}
