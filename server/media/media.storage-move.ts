import { createHash } from "node:crypto";
import type { MediaStorage } from "./media.storage.ts";

export interface CopyReport {
  /** Keys found in the source store. */
  total: number;
  /** Copied and verified by this run. */
  copied: number;
  /** Already at the destination with the same SHA-256 (an earlier run's work). */
  skipped: number;
  /** Keys that could not be copied or did not verify, with why. */
  failed: Array<{ key: string; reason: string }>;
  /** True when `limit` stopped the run before every key was looked at. */
  stopped: boolean;
}

const sha256 = (data: Buffer) => createHash("sha256").update(data).digest("hex");

/**
 * Copies every key of one store into another and verifies each by the SHA-256 of the bytes
 * read back from the destination (decision 066). Resumable: a key already at the destination
 * with the source's checksum is skipped, so a stopped run is continued by running it again;
 * one whose bytes differ (a torn or corrupted copy) is copied again. Switches nothing: the
 * caller decides what to do with a report without failures.
 */
export async function copyStore(
  from: MediaStorage,
  to: MediaStorage,
  opts: { /** Copy at most this many keys, then stop (a resumable part of the work). */ limit?: number; progress?: (line: string) => void } = {},
): Promise<CopyReport> {
  const report: CopyReport = { total: 0, copied: 0, skipped: 0, failed: [], stopped: false };
  const say = opts.progress ?? (() => {});
  const keys: string[] = [];
  for await (const { key } of from.list("")) keys.push(key);
  keys.sort();
  report.total = keys.length;
  for (const [i, key] of keys.entries()) {
    if (opts.limit !== undefined && report.copied >= opts.limit) {
      report.stopped = true;
      break;
    }
    try {
      const data = await from.get(key);
      if (!data) {
        // Removed from the source since the listing (a sweep): nothing to keep.
        say(`[${i + 1}/${keys.length}] ${key}: gone from the source, skipped`);
        continue;
      }
      const want = sha256(data);
      const there = await to.get(key);
      if (there && sha256(there) === want) {
        report.skipped += 1;
        continue;
      }
      await to.put(key, data);
      const back = await to.get(key);
      if (!back || sha256(back) !== want) throw new Error("the copy read back does not match the source's SHA-256");
      report.copied += 1;
      say(`[${i + 1}/${keys.length}] ${key}: copied, ${data.length} bytes, sha256 ${want.slice(0, 12)}… verified`);
    } catch (err) {
      const reason = err instanceof Error ? err.message : String(err);
      report.failed.push({ key, reason });
      say(`[${i + 1}/${keys.length}] ${key}: FAILED (${reason})`);
    }
  }
  return report;
}
