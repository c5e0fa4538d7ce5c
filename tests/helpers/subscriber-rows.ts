import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";

/**
 * Rows for `subscribers`: `count` confirmed weekly readers of a project, "Paging Reader 1…n" at
 * `reader-NN@<domain>`, created one second apart from `startAt` so "newest first" is a fixed order.
 */
export function readerRows(projectId: number, count: number, domain: string, startAt: number) {
  return Array.from({ length: count }, (_, i) => {
    const email = `reader-${String(i + 1).padStart(2, "0")}@${domain}`;
    return {
      project_id: projectId,
      email,
      email_hash: hashAddress(email),
      name: `Paging Reader ${i + 1}`,
      interest: "prospect",
      frequency: "weekly",
      topics: null,
      topics_key: "all",
      status: "confirmed",
      consent_at: new Date(startAt),
      consent_version: "2026-12-01",
      consent_source: "subscribe form",
      consent_ip: "192.0.2.7",
      created_at: new Date(startAt + i * 1000),
    };
  });
}
