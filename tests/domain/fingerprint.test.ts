import fc from "fast-check";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { differenceHash, fingerprintHalves, hammingDistance, isFingerprint, popcount32 } from "../../src/shared/domain/fingerprint.ts";
import { THEN_AND_NOW_MAX_DISTANCE } from "../../src/shared/schemas/writing-help.ts";
import { fingerprintOf } from "../../server/media/media.fingerprint.ts";
import { seededRandom } from "../helpers/images.ts";

// Pictures whose likeness is known: one drawn scene, then the same scene shifted, rescaled,
// re-encoded badly and brightened, against other scenes drawn the same way. Our own examples.

const SCENE_W = 720;
const SCENE_H = 540;
const VIEW_W = 640;
const VIEW_H = 480;

/** A scene of gradients and shapes, drawn a little larger than the view so the view can move. */
function sceneSvg(seed: number): string {
  const rnd = seededRandom(seed);
  const tone = () => Math.round(rnd() * 255);
  const colour = () => `rgb(${tone()},${tone()},${tone()})`;
  let shapes = "";
  for (let i = 0; i < 14; i += 1) {
    const x = Math.round(rnd() * SCENE_W);
    const y = Math.round(rnd() * SCENE_H);
    const s = 30 + Math.round(rnd() * 160);
    shapes += rnd() < 0.5 ? `<rect x="${x - s / 2}" y="${y - s / 2}" width="${s}" height="${Math.round(s * (0.4 + rnd()))}" fill="${colour()}"/>` : `<circle cx="${x}" cy="${y}" r="${s / 2}" fill="${colour()}"/>`;
  }
  const horizon = 150 + Math.round(rnd() * 250);
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${SCENE_W}" height="${SCENE_H}">
    <defs><linearGradient id="g" x1="${rnd() < 0.5 ? 0 : 1}" y1="0" x2="${rnd() < 0.5 ? 0 : 1}" y2="1"><stop offset="0" stop-color="${colour()}"/><stop offset="1" stop-color="${colour()}"/></linearGradient></defs>
    <rect width="${SCENE_W}" height="${SCENE_H}" fill="url(#g)"/><rect y="${horizon}" width="${SCENE_W}" height="${SCENE_H - horizon}" fill="${colour()}" opacity="0.7"/>${shapes}</svg>`;
}

/** The view of a scene from (`left`, `top`), as a PNG. */
async function view(seed: number, left = 40, top = 30): Promise<Buffer> {
  const full = await sharp(Buffer.from(sceneSvg(seed))).png().toBuffer();
  return sharp(full).extract({ left, top, width: VIEW_W, height: VIEW_H }).png().toBuffer();
}

describe("the photo fingerprint on pictures whose likeness is known", () => {
  it("scores the same scene close, whether shifted a few pixels, rescaled, re-encoded at low quality or brightened", async () => {
    for (const seed of [1, 2, 3]) {
      const original = await view(seed);
      const base = await fingerprintOf(original);
      const altered = {
        shifted: await view(seed, 46, 34),
        rescaled: await sharp(original).resize(Math.round(VIEW_W * 0.45)).png().toBuffer(),
        reencoded: await sharp(original).jpeg({ quality: 12 }).toBuffer(),
        brightened: await sharp(original).modulate({ brightness: 1.25 }).png().toBuffer(),
        all: await sharp(await view(seed, 34, 26)).resize(400).modulate({ brightness: 1.15 }).jpeg({ quality: 20 }).toBuffer(),
      };
      for (const [how, picture] of Object.entries(altered)) {
        const d = hammingDistance(base, await fingerprintOf(picture));
        expect(d, `scene ${seed}, ${how}`).toBeLessThanOrEqual(THEN_AND_NOW_MAX_DISTANCE);
      }
    }
  });

  it("scores different scenes far apart: well above the threshold", async () => {
    const prints = await Promise.all([1, 2, 3, 4, 5, 6, 7, 8].map(async (seed) => fingerprintOf(await view(seed))));
    for (let i = 0; i < prints.length; i += 1) {
      for (let j = i + 1; j < prints.length; j += 1) {
        expect(hammingDistance(prints[i]!, prints[j]!), `scenes ${i + 1} and ${j + 1}`).toBeGreaterThan(THEN_AND_NOW_MAX_DISTANCE + 6);
      }
    }
  });

  it("reads a picture with transparency on white, as 16 hex digits", async () => {
    const png = await sharp(await view(4)).ensureAlpha(0.5).png().toBuffer();
    expect(isFingerprint(await fingerprintOf(png))).toBe(true);
  });
});

describe("differenceHash", () => {
  // Source: N. Krawetz, "Kind of Like That" (The Hacker Factor Blog, 2013): 9 × 8 grey pixels,
  // one bit per adjacent pair in each row, 64 bits. Which way round the bit goes is ours: 1 when
  // the left pixel is brighter.
  it("sets a bit where the left pixel is brighter than the right one, row 0 in the top bits", () => {
    const falling = Array.from({ length: 72 }, (_, i) => 255 - (i % 9) * 10);
    const rising = Array.from({ length: 72 }, (_, i) => (i % 9) * 10);
    expect(differenceHash(falling)).toBe("ffffffffffffffff");
    expect(differenceHash(rising)).toBe("0000000000000000");
    const firstRowFalls = Array.from({ length: 72 }, (_, i) => (i < 9 ? 255 - i : 0));
    expect(differenceHash(firstRowFalls)).toBe("ff00000000000000");
    const lastPairFalls = Array.from({ length: 72 }, (_, i) => (i === 70 ? 9 : 0));
    expect(differenceHash(lastPairFalls)).toBe("0000000000000001");
  });

  it("refuses a grid of the wrong size", () => {
    expect(() => differenceHash([1, 2, 3])).toThrow(RangeError);
  });
});

describe("hammingDistance", () => {
  /** The reference: one bit at a time over BigInt. */
  const reference = (a: string, b: string) => {
    let x = BigInt(`0x${a}`) ^ BigInt(`0x${b}`);
    let n = 0;
    while (x > 0n) {
      n += Number(x & 1n);
      x >>= 1n;
    }
    return n;
  };
  const hex16 = fc.bigInt({ min: 0n, max: (1n << 64n) - 1n }).map((n) => n.toString(16).padStart(16, "0"));

  it("counts the differing bits as a bit-by-bit count does", () => {
    fc.assert(
      fc.property(hex16, hex16, (a, b) => {
        expect(hammingDistance(a, b)).toBe(reference(a, b));
      }),
      { numRuns: 2000 },
    );
  });

  // Common practice (no published source): popcount of 0 and of all ones, and the distance's
  // symmetry and range.
  it("is 0 for the same print, 64 for its complement, symmetric", () => {
    expect(popcount32(0)).toBe(0);
    expect(popcount32(0xffffffff)).toBe(32);
    expect(popcount32(0x80000001)).toBe(2);
    expect(hammingDistance("0123456789abcdef", "0123456789abcdef")).toBe(0);
    expect(hammingDistance("0000000000000000", "ffffffffffffffff")).toBe(64);
    fc.assert(fc.property(hex16, hex16, (a, b) => hammingDistance(a, b) === hammingDistance(b, a)));
  });

  it("refuses what is not 16 lower-case hex digits", () => {
    expect(() => fingerprintHalves("0123")).toThrow(RangeError);
    expect(() => hammingDistance("0123456789ABCDEF", "0123456789abcdef")).toThrow(RangeError);
    expect(isFingerprint("0123456789abcdeg")).toBe(false);
  });
});
