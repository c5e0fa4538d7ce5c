import sharp, { type Sharp } from "sharp";
import { differenceHash, FINGERPRINT_GRID } from "#shared/domain/fingerprint.ts";

/**
 * The perceptual fingerprint of a picture (src/shared/domain/fingerprint.ts): shrunk to 9 × 8,
 * flattened on white, in grey, as 16 hex digits. The pipeline passes the smallest derivative it
 * has already decoded (media.pipeline.ts); the backfill passes a stored derivative's bytes.
 */
export async function fingerprintOf(image: Sharp | Buffer): Promise<string> {
  const { width, height } = FINGERPRINT_GRID;
  const source = Buffer.isBuffer(image) ? sharp(image, { failOn: "error" }).rotate() : image;
  const { data, info } = await source
    .flatten({ background: "#ffffff" })
    .resize(width, height, { fit: "fill" })
    .greyscale()
    .raw()
    .toBuffer({ resolveWithObject: true });
  // One grey channel; should sharp keep more (an alpha it could not flatten), the first is the grey.
  const grey = info.channels === 1 ? data : Uint8Array.from({ length: width * height }, (_, i) => data[i * info.channels] as number);
  return differenceHash(grey);
}
