import type { Readable } from "node:stream";
import type { SignedVariantQuery, VariantFormat } from "#shared/schemas/media.ts";
import { AppError } from "../core/app-error.ts";
import { createTokenSigner } from "../core/signed-token.ts";
import type { MediaContext } from "./media.context.ts";
import { findReadableVariant, type FileReader } from "./media.repository.ts";
import { storedFile, type StoredFile } from "./media.storage.ts";

const CONTENT_TYPES: Record<VariantFormat, string> = { avif: "image/avif", webp: "image/webp", jpeg: "image/jpeg" };

/** The file-name part of a derivative's URL: content hash, width, format. */
const VARIANT_NAME = /^[0-9a-f]{16}-\d{1,5}w\.(avif|webp|jpg)$/;

/*
 * Signed derivative links (investor images in e-mail, which no session reaches) are signed by
 * server/core/signed-token.ts under the `mediaLink` purpose: its own key, so no subscriber, web-copy
 * or other link signed with TOKEN_SECRET can be presented as a media signature, nor the other way round.
 */
/** A recipient's own cache may keep a signed image at most this long (and never past the link's expiry). */
export const SIGNED_LINK_MAX_CACHE_SECONDS = 24 * 60 * 60;
/** A signed link as it appears in text or HTML (`&` escaped or not); groups: name, exp, separator, sig. */
const SIGNED_LINK_IN_TEXT = /\/media\/s\/([0-9a-f]{16}-\d{1,5}w\.(?:avif|webp|jpg))\?exp=(\d{1,12})(&amp;|&)sig=([A-Za-z0-9_-]{43})/g;

/** A derivative a reader may see, not yet opened: the router streams it (ranges too) or redirects. */
export interface VariantFile extends StoredFile {
  /** Cleared and used in published public content: shared caches may keep it. */
  isPublic: boolean;
  etag: string;
}

export interface ReadableFile {
  stream: Readable;
  bytes: number;
  contentType: string;
  /** Cleared and used in published public content: shared caches may keep it. */
  isPublic: boolean;
  etag: string;
}

/**
 * Derivative files for their readers: by audience (a session or none), or by a signed, expiring
 * link. Without `tokenSecret` no signed link is made or accepted (the seed needs none).
 */
export function createMediaLinks(ctx: MediaContext, tokenSecret: string | undefined) {
  const { db, storage } = ctx;
  const signer = tokenSecret ? createTokenSigner(tokenSecret) : null;

  /** Whether `sig` is this service's signature of (name, exp), whatever the time. */
  function isSignedBy(name: string, exp: number, sig: string | undefined): boolean {
    return signer !== null && signer.verifyParts("mediaLink", [name], exp, sig, new Date(0)).ok;
  }

  function signatureOf(name: string, exp: number): string {
    if (!signer) throw new Error("signed media links need TOKEN_SECRET");
    return signer.signParts("mediaLink", [name], exp);
  }

  function signedPath(name: string, exp: number): string {
    return `/media/s/${name}?exp=${exp}&sig=${signatureOf(name, exp)}`;
  }

  async function variantFile(name: string, reader: FileReader): Promise<VariantFile | null> {
    if (!VARIANT_NAME.test(name)) return null;
    const key = `variants/${name}`;
    const found = await findReadableVariant(db, key, reader);
    if (!found) return null;
    return { ...storedFile(storage, key, CONTENT_TYPES[found.format]), isPublic: found.isPublic, etag: `"${name.slice(0, 16)}"` };
  }

  /**
   * A derivative by its file name, for the reader's audience; null for a name that is not
   * a derivative, a photo this reader may not see, or bytes missing from storage.
   */
  async function readVariant(name: string, reader: FileReader): Promise<ReadableFile | null> {
    const found = await variantFile(name, reader);
    const file = found ? await found.open() : null;
    if (!found || !file) return null;
    return { stream: file.stream, bytes: file.bytes, contentType: found.contentType, isPublic: found.isPublic, etag: found.etag };
  }

  return {
    readVariant,

    /**
     * A derivative by its file name for the reader's audience, not yet opened (the audience is
     * checked here, before any byte or redirect); null for a name that is not a derivative or a
     * photo this reader may not see.
     */
    variantFile,

    /**
     * A derivative for the holder of a signed link: the signature grants the investor audience
     * (cleared, used in published public or investor content), never staff's. Null for a forged,
     * altered or missing signature, a name that is not a derivative, or a photo investors may not
     * see; an authentic link past its expiry is refused with 410.
     */
    async readSignedVariant(name: string, link: SignedVariantQuery, now: Date = new Date()): Promise<(VariantFile & { maxAgeSeconds: number }) | null> {
      if (!VARIANT_NAME.test(name) || !signer) return null;
      const checked = signer.verifyParts("mediaLink", [name], link.exp, link.sig, now);
      // A forged link stays 404 whatever its expiry: the same answer as a hidden image.
      if (!checked.ok && checked.reason !== "expired") return null;
      if (!checked.ok) throw new AppError("link_expired", "This image link has expired. Open the digest's web copy for a fresh one.", 410);
      const file = await variantFile(name, "investor");
      const left = Math.floor(link.exp - now.getTime() / 1000);
      return file ? { ...file, maxAgeSeconds: Math.min(left, SIGNED_LINK_MAX_CACHE_SECONDS) } : null;
    },

    /**
     * The signed, expiring same-origin URL of a derivative (`/media/s/<name>?exp=…&sig=…`), from its
     * name or its `/media/v/` URL. Not personal: anyone holding it sees that one image until it expires.
     */
    signedVariantUrl(variant: string, expiresAt: Date): string {
      const name = variant.replace(/^\/media\/v\//, "");
      if (!VARIANT_NAME.test(name)) throw new Error(`not a derivative: ${variant}`);
      return signedPath(name, Math.ceil(expiresAt.getTime() / 1000));
    },

    /**
     * Every authentic signed derivative link in `text` (HTML or plain), signed again to expire at
     * `expiresAt`; anything else is left as it is. For copies kept longer than their links (the web copy).
     */
    refreshSignedUrls(text: string, expiresAt: Date): string {
      if (!signer) return text;
      const exp = Math.ceil(expiresAt.getTime() / 1000);
      return text.replace(SIGNED_LINK_IN_TEXT, (whole, name: string, oldExp: string, sep: string, sig: string) => {
        if (!isSignedBy(name, Number(oldExp), sig)) return whole;
        return `/media/s/${name}?exp=${exp}${sep}sig=${signatureOf(name, exp)}`;
      });
    },
  };
}
