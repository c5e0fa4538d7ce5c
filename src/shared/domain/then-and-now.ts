import { isCalendarDate, toDayNumber } from "./calendar.ts";
import { fingerprintHalves, isFingerprint, popcount32 } from "./fingerprint.ts";

/**
 * Then-and-now pairs found for the writer (issue #15 item 3, docs/decisions/063-then-and-now-pairs.md):
 * two photos of one area, taken far apart in time, of the same framing (their fingerprints close).
 */

/** A photo as the pairing needs it. */
export interface PairablePhoto {
  id: number;
  /** Its area tags. */
  areas: readonly string[];
  /** Capture time as the camera recorded it; its calendar date (the first 10 characters) counts. */
  takenAt: string | null;
  /** 16 hex digits (domain/fingerprint.ts), or null before it is computed. */
  fingerprint: string | null;
  /** Whether it may be shown to the audience the pairs are for (the caller's rule). */
  cleared: boolean;
}

export interface PairOptions {
  /** Fewest calendar days between the two captures. */
  minDays: number;
  /** Largest Hamming distance of the two fingerprints (0–64) still counted as the same framing. */
  maxDistance: number;
  /** Only this area. */
  area?: string;
  /** At most this many pairs, best first. */
  limit?: number;
}

export interface FoundPair {
  area: string;
  /** The earlier photo. */
  thenId: number;
  /** The later photo. */
  nowId: number;
  /** Calendar days between the two captures. */
  daysApart: number;
  /** Hamming distance of the fingerprints, 0–64. */
  distance: number;
  /** The ranking score (higher first): time apart and likeness, each 0–1, added. */
  score: number;
}

/** Time apart counts fully up to two years: beyond that every pair is "long ago". */
export const FULL_SPREAD_DAYS = 730;
/** Candidates kept per earlier photo before the one-pair-per-photo choice (bounds the work on a library of one framing). */
const BEST_PER_PHOTO = 8;

/**
 * The ranking: `min(daysApart, 730) / 730 + (1 − distance / (maxDistance + 1))`. Both terms run
 * from 0 to 1, so a year more of progress weighs as much as half the allowed framing difference.
 */
export function pairScore(daysApart: number, distance: number, maxDistance: number): number {
  return Math.min(daysApart, FULL_SPREAD_DAYS) / FULL_SPREAD_DAYS + (1 - distance / (maxDistance + 1));
}

interface Prepared {
  id: number;
  day: number;
  hi: number;
  lo: number;
}

/**
 * The then-and-now pairs among `photos`: both cleared, both tagged with the same area, captured at
 * least `minDays` calendar days apart, with fingerprints at most `maxDistance` bits apart. Ranked
 * by `pairScore` (ties: more days apart, then closer, then lower ids); within one area each photo
 * is in at most one pair (the best one it can still take, greedily), so the offer is not one
 * favourite photo matched with every other. A photo with no capture date or no fingerprint is
 * never paired.
 *
 * Per area the photos are sorted by capture day; each is compared only with those at least
 * `minDays` later, on two 32-bit halves of the fingerprints.
 */
export function findThenAndNowPairs(photos: readonly PairablePhoto[], options: PairOptions): FoundPair[] {
  const byArea = new Map<string, Prepared[]>();
  for (const p of photos) {
    if (!p.cleared || !p.takenAt || !isFingerprint(p.fingerprint)) continue;
    const date = p.takenAt.slice(0, 10);
    if (!isCalendarDate(date)) continue;
    const [hi, lo] = fingerprintHalves(p.fingerprint);
    const prepared: Prepared = { id: p.id, day: toDayNumber(date), hi, lo };
    for (const area of new Set(p.areas)) {
      if (options.area !== undefined && area !== options.area) continue;
      const list = byArea.get(area);
      if (list) list.push(prepared);
      else byArea.set(area, [prepared]);
    }
  }

  const all: FoundPair[] = [];
  for (const [area, list] of byArea) {
    list.sort((a, b) => a.day - b.day || a.id - b.id);
    const candidates: FoundPair[] = [];
    let start = 0;
    for (let i = 0; i < list.length; i += 1) {
      const then = list[i] as Prepared;
      // `start` only moves on: the first photo at least minDays after `then`.
      if (start <= i) start = i + 1;
      while (start < list.length && (list[start] as Prepared).day - then.day < options.minDays) start += 1;
      const mine: FoundPair[] = [];
      for (let j = start; j < list.length; j += 1) {
        const now = list[j] as Prepared;
        const distance = popcount32(then.hi ^ now.hi) + popcount32(then.lo ^ now.lo);
        if (distance > options.maxDistance) continue;
        const daysApart = now.day - then.day;
        mine.push({ area, thenId: then.id, nowId: now.id, daysApart, distance, score: pairScore(daysApart, distance, options.maxDistance) });
      }
      mine.sort(byRank);
      candidates.push(...mine.slice(0, BEST_PER_PHOTO));
    }
    candidates.sort(byRank);
    const used = new Set<number>();
    for (const c of candidates) {
      if (used.has(c.thenId) || used.has(c.nowId)) continue;
      used.add(c.thenId);
      used.add(c.nowId);
      all.push(c);
    }
  }
  all.sort((a, b) => byRank(a, b) || a.area.localeCompare(b.area));
  return options.limit === undefined ? all : all.slice(0, options.limit);
}

function byRank(a: FoundPair, b: FoundPair): number {
  return b.score - a.score || b.daysApart - a.daysApart || a.distance - b.distance || a.thenId - b.thenId || a.nowId - b.nowId;
}
