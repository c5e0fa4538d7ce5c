/**
 * The perceptual fingerprint of a photo (issue #15 item 3, docs/decisions/063-then-and-now-pairs.md):
 * a 64-bit difference hash ("dHash"), written as 16 lower-case hex digits.
 *
 * The picture is shrunk to 9 × 8 grey pixels; each bit says whether a pixel is brighter than its
 * right-hand neighbour (8 comparisons in each of 8 rows). Shifting the view a little, rescaling,
 * re-encoding or brightening the whole picture keeps most of those comparisons, so two photos of
 * one framing differ in few bits; two different scenes differ in about half of them.
 * Source: N. Krawetz, "Kind of Like That" (The Hacker Factor Blog, 21 January 2013), the dHash
 * method: 9 × 8 greyscale, compare adjacent pixels in each row, 64 bits, Hamming distance.
 */

/** Width and height of the grey picture a fingerprint is taken from, pixels. */
export const FINGERPRINT_GRID = { width: 9, height: 8 } as const;

const HEX16 = /^[0-9a-f]{16}$/;

/** Whether `value` is a fingerprint as stored: exactly 16 lower-case hex digits. */
export function isFingerprint(value: unknown): value is string {
  return typeof value === "string" && HEX16.test(value);
}

/** Set bits of a 32-bit unsigned integer (the SWAR method: no loop, no table). */
export function popcount32(n: number): number {
  let v = n >>> 0;
  v = v - ((v >>> 1) & 0x55555555);
  v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
  v = (v + (v >>> 4)) & 0x0f0f0f0f;
  return Math.imul(v, 0x01010101) >>> 24;
}

/** A fingerprint as its two 32-bit halves (high: rows 0–3, low: rows 4–7), for fast comparison. */
export function fingerprintHalves(fingerprint: string): [number, number] {
  if (!isFingerprint(fingerprint)) throw new RangeError(`not a fingerprint: ${JSON.stringify(fingerprint)}`);
  return [Number.parseInt(fingerprint.slice(0, 8), 16) >>> 0, Number.parseInt(fingerprint.slice(8), 16) >>> 0];
}

/** Bits that differ between two fingerprints: 0 (the same) to 64. */
export function hammingDistance(a: string, b: string): number {
  const [ah, al] = fingerprintHalves(a);
  const [bh, bl] = fingerprintHalves(b);
  return popcount32(ah ^ bh) + popcount32(al ^ bl);
}

/**
 * The difference hash of a 9 × 8 grey picture, rows from the top, each pixel's brightness in
 * any unit (0–255 from an 8-bit decode). Bit 63 (the first hex digit's top bit) is row 0's first
 * comparison; a bit is 1 when the left pixel is brighter than the right one.
 */
export function differenceHash(grey: ArrayLike<number>): string {
  const { width, height } = FINGERPRINT_GRID;
  if (grey.length !== width * height) throw new RangeError(`differenceHash: expected ${width * height} grey pixels, got ${grey.length}`);
  const halves = [0, 0];
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width - 1; x += 1) {
      const bit = (grey[y * width + x] as number) > (grey[y * width + x + 1] as number) ? 1 : 0;
      const half = y < height / 2 ? 0 : 1;
      halves[half] = (((halves[half] as number) << 1) | bit) >>> 0;
    }
  }
  return halves.map((h) => h.toString(16).padStart(8, "0")).join("");
}
