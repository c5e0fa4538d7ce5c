/**
 * Benchmark of the then-and-now pairing (src/shared/domain/then-and-now.ts, decision 063):
 * 10,000 invented photos over two years. A plain script, not a test:
 *   npm run bench -- pairs        (or npx tsx tests/bench/pairs.bench.ts)
 * Target: ≤ 200 ms for 10,000 photos (issue #15).
 *
 * The library: 40 areas; in each, 10 spots photographed again and again (each photo its spot's
 * fingerprint with 0–10 bits flipped, as the fingerprint test measures for one framing), and a
 * third of the photos one-off views. Also printed, for scale: the same 10,000 photos in one area.
 */
import { findThenAndNowPairs, type PairablePhoto } from "../../src/shared/domain/then-and-now.ts";
import { addDays } from "../../src/shared/domain/calendar.ts";
import { THEN_AND_NOW_MAX_DISTANCE, THEN_AND_NOW_MIN_DAYS } from "../../src/shared/schemas/writing-help.ts";

const PHOTOS = 10_000;
const AREAS = 40;
const SPOTS_PER_AREA = 10;
const DAYS = 730;
const WARM_UP = 5;
const RUNS = 21;
const TARGET_MS = 200;

// A small deterministic generator, so every run measures the same library.
let seed = 20261205;
function random(): number {
  seed = (seed * 1_103_515_245 + 12_345) % 2_147_483_648;
  return seed / 2_147_483_648;
}
const word = () => Math.floor(random() * 2 ** 16);
const hex64 = () => [word(), word(), word(), word()].map((w) => w.toString(16).padStart(4, "0")).join("");
function flip(hex: string, bits: number): string {
  let n = BigInt(`0x${hex}`);
  for (let i = 0; i < bits; i += 1) n ^= 1n << BigInt(Math.floor(random() * 64));
  return n.toString(16).padStart(16, "0");
}

const spots = Array.from({ length: AREAS * SPOTS_PER_AREA }, () => hex64());
const library: PairablePhoto[] = Array.from({ length: PHOTOS }, (_, i) => {
  const area = Math.floor(random() * AREAS);
  const oneOff = random() < 1 / 3;
  const fingerprint = oneOff ? hex64() : flip(spots[area * SPOTS_PER_AREA + Math.floor(random() * SPOTS_PER_AREA)]!, Math.floor(random() * 11));
  return { id: i + 1, areas: [`Area ${area + 1}`], takenAt: `${addDays("2025-01-01", Math.floor(random() * DAYS))}T10:00:00`, fingerprint, cleared: random() < 0.9 };
});
const oneArea = library.map((p) => ({ ...p, areas: ["Hall 2A"] }));
const options = { minDays: THEN_AND_NOW_MIN_DAYS, maxDistance: THEN_AND_NOW_MAX_DISTANCE };

function measure(photos: PairablePhoto[]): { median: number; found: number } {
  let found = 0;
  const once = () => {
    const t0 = performance.now();
    found = findThenAndNowPairs(photos, options).length;
    return performance.now() - t0;
  };
  for (let i = 0; i < WARM_UP; i += 1) once();
  const times = Array.from({ length: RUNS }, once).sort((a, b) => a - b);
  return { median: times[Math.floor(RUNS / 2)]!, found };
}

const spread = measure(library);
if (spread.found === 0) throw new Error("unexpected benchmark result: no pairs");
process.stdout.write(`pairs: ${PHOTOS.toLocaleString("en-GB")} photos in ${AREAS} areas: ${spread.median.toFixed(1)} ms (median of ${RUNS}), ${spread.found} pairs; target ≤ ${TARGET_MS} ms: ${spread.median <= TARGET_MS ? "met" : "NOT MET"}\n`);
const single = measure(oneArea);
process.stdout.write(`pairs: the same ${PHOTOS.toLocaleString("en-GB")} photos all in one area: ${single.median.toFixed(1)} ms (median of ${RUNS}), ${single.found} pairs\n`);
