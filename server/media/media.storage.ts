import { randomBytes } from "node:crypto";
import { createReadStream } from "node:fs";
import { mkdir, readdir, readFile, rename, rm, stat, unlink, writeFile, copyFile } from "node:fs/promises";
import path from "node:path";
import os from "node:os";
import type { Readable } from "node:stream";
import type { RequestHandler } from "express";
import multer from "multer";

/**
 * Where media bytes live, behind one small interface so that a deployment with several
 * app servers can put an S3-compatible store behind it instead of the local disk.
 * Keys are relative, slash-separated names such as `originals/ab/<sha256>.jpg` or
 * `variants/<hash>-1600w.avif`. Every write is atomic: a reader sees the whole file or
 * none, so a crash can never leave half a file under a key.
 */
export interface MediaStorage {
  /** Stores bytes under a key, replacing what was there (same key, same bytes: content-hashed). */
  put(key: string, data: Buffer): Promise<void>;
  /** Moves a local file (an upload's temporary file) under a key. */
  putFile(key: string, filePath: string): Promise<void>;
  /** The bytes under a key, or null when there are none. */
  get(key: string): Promise<Buffer | null>;
  /**
   * A stream of the bytes under a key, or of the inclusive byte range given (within the object:
   * the caller checked it against `size`), with the streamed length and the whole object's size;
   * null when there are none.
   */
  stream(key: string, range?: ByteRange): Promise<{ stream: Readable; bytes: number; size: number } | null>;
  /** Removes a key; removing a missing key is not an error. */
  delete(key: string): Promise<void>;
  /** Every key under a prefix with its last write time, for sweeps. */
  list(prefix: string): AsyncIterable<{ key: string; modifiedAt: Date }>;
  /** A GET URL of the store itself for a key, valid for `seconds`; only stores that can sign one (S3). */
  presignedUrl?(key: string, seconds: number, response: { contentType: string; disposition?: string }): Promise<string>;
  /**
   * Set when private files are handed out as presigned URLs of this lifetime instead of being
   * streamed by the app (MEDIA_PRIVATE_DELIVERY=presigned on a store that can presign).
   */
  readonly presignSeconds?: number;
}

/** Inclusive byte offsets, as in an HTTP Range header. */
export interface ByteRange {
  start: number;
  end: number;
}

const KEY = /^[a-z0-9]+(?:[a-z0-9_.-]*[a-z0-9])?(?:\/[a-z0-9]+(?:[a-z0-9_.-]*[a-z0-9])?)*$/;

/** Refuses anything that is not a plain relative key (no `..`, no absolute paths, no odd bytes). */
export function checkKey(key: string): string {
  if (key.length > 200 || !KEY.test(key) || key.split("/").some((part) => part === "." || part === "..")) {
    throw new RangeError(`Not a valid media storage key: ${JSON.stringify(key)}`);
  }
  return key;
}

/** The folder names under MEDIA_DIR that are not keys: half-written files and uploads in flight. */
const WRITING_DIR = ".writing";
const UPLOADS_DIR = ".uploads";

/** Local-disk storage under one directory (MEDIA_DIR). Several processes on one machine may share it. */
export function createLocalDiskStorage(root: string): MediaStorage {
  const base = path.resolve(root);
  const full = (key: string) => path.join(base, ...checkKey(key).split("/"));
  const writing = path.join(base, WRITING_DIR);

  async function place(key: string, write: (tmp: string) => Promise<void>): Promise<void> {
    const target = full(key);
    await mkdir(path.dirname(target), { recursive: true });
    await mkdir(writing, { recursive: true });
    // Written beside the target's file system, then renamed: rename is atomic on one file
    // system, so another process reading the key never sees a partial file.
    const tmp = path.join(writing, `${randomBytes(12).toString("hex")}.part`);
    try {
      await write(tmp);
      await rename(tmp, target);
    } catch (err) {
      await rm(tmp, { force: true });
      throw err;
    }
  }

  return {
    put: (key, data) => place(key, (tmp) => writeFile(tmp, data)),
    putFile: (key, filePath) =>
      place(key, async (tmp) => {
        try {
          await rename(filePath, tmp);
        } catch (err) {
          // The upload folder may sit on another file system (EXDEV): copy instead.
          if ((err as NodeJS.ErrnoException).code !== "EXDEV") throw err;
          await copyFile(filePath, tmp);
          await unlink(filePath);
        }
      }),
    async get(key) {
      try {
        return await readFile(full(key));
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
        throw err;
      }
    },
    async stream(key, range) {
      const file = full(key);
      try {
        const { size } = await stat(file);
        if (range) return { stream: createReadStream(file, range), bytes: range.end - range.start + 1, size };
        return { stream: createReadStream(file), bytes: size, size };
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
        throw err;
      }
    },
    async delete(key) {
      await rm(full(key), { force: true });
    },
    async *list(prefix) {
      const start = path.join(base, ...prefix.split("/").filter(Boolean));
      const walk = async function* (dir: string): AsyncGenerator<{ key: string; modifiedAt: Date }> {
        let entries;
        try {
          entries = await readdir(dir, { withFileTypes: true });
        } catch (err) {
          if ((err as NodeJS.ErrnoException).code === "ENOENT") return;
          throw err;
        }
        for (const entry of entries) {
          const p = path.join(dir, entry.name);
          if (entry.name.startsWith(".")) continue;
          if (entry.isDirectory()) yield* walk(p);
          else if (entry.isFile()) yield { key: path.relative(base, p).split(path.sep).join("/"), modifiedAt: (await stat(p)).mtime };
        }
      };
      yield* walk(start);
    },
  };
}

/** A file received by the upload middleware, still in the temporary folder. */
export interface ReceivedFile {
  path: string;
  originalName: string;
  size: number;
}

/**
 * The temporary folder uploads are received into (MEDIA_DIR/.uploads), and the folder of
 * half-written storage files (MEDIA_DIR/.writing). Files left there by a crash are swept at
 * start-up; only files older than `olderThanMs` go, because other processes sharing the
 * folder may be receiving uploads at that moment.
 */
export function createUploadArea(root: string) {
  const base = path.resolve(root);
  const uploads = path.join(base, UPLOADS_DIR);
  const writing = path.join(base, WRITING_DIR);

  return {
    dir: uploads,

    /** multer writing each file of field `files` (or the one named) into the temporary folder, within the limits. */
    receiver(limits: { maxFileBytes: number; maxFiles: number; field?: string }): RequestHandler {
      const storage = multer.diskStorage({
        destination: (_req, _file, cb) => {
          mkdir(uploads, { recursive: true }).then(() => cb(null, uploads), (err: Error) => cb(err, uploads));
        },
        filename: (_req, _file, cb) => cb(null, `${randomBytes(16).toString("hex")}.upload`),
      });
      return multer({
        storage,
        // Browsers send file names as UTF-8; busboy would read them as Latin-1.
        defParamCharset: "utf8",
        limits: { fileSize: limits.maxFileBytes, files: limits.maxFiles, fields: 10, fieldSize: 10_000, parts: limits.maxFiles + 10 },
      }).array(limits.field ?? "files", limits.maxFiles);
    },

    /** Multer's file objects as the service sees them. */
    filesOf(files: unknown): ReceivedFile[] {
      if (!Array.isArray(files)) return [];
      return (files as Express.Multer.File[]).map((f) => ({ path: f.path, originalName: decodeName(f.originalname), size: f.size }));
    },

    /** The bytes of a received file. */
    async read(file: { path: string }): Promise<Buffer> {
      if (path.dirname(path.resolve(file.path)) !== uploads) throw new RangeError(`Not an upload: ${file.path}`);
      return readFile(file.path);
    },

    /** Removes temporary files (after they were stored or refused); missing ones are fine. */
    async discard(files: ReadonlyArray<{ path: string }>): Promise<void> {
      await Promise.all(
        files.map((f) => {
          // Only ever inside the upload folder: a path from elsewhere is a bug, not a file to remove.
          if (path.dirname(path.resolve(f.path)) !== uploads) throw new RangeError(`Not an upload: ${f.path}`);
          return rm(f.path, { force: true });
        }),
      );
    },

    /** How many files are in the temporary folders now (uploads and half-written), for tests and health. */
    async countTemporary(): Promise<number> {
      let n = 0;
      for (const dir of [uploads, writing]) {
        try {
          n += (await readdir(dir)).length;
        } catch (err) {
          if ((err as NodeJS.ErrnoException).code !== "ENOENT") throw err;
        }
      }
      return n;
    },

    /** Deletes temporary files older than `olderThanMs`; returns how many went. */
    async sweep(olderThanMs: number, now = Date.now()): Promise<number> {
      let removed = 0;
      for (const dir of [uploads, writing]) {
        let names: string[];
        try {
          names = await readdir(dir);
        } catch (err) {
          if ((err as NodeJS.ErrnoException).code === "ENOENT") continue;
          throw err;
        }
        for (const name of names) {
          const p = path.join(dir, name);
          try {
            const { mtimeMs } = await stat(p);
            if (now - mtimeMs >= olderThanMs) {
              await rm(p, { force: true, recursive: true });
              removed += 1;
            }
          } catch (err) {
            if ((err as NodeJS.ErrnoException).code !== "ENOENT") throw err;
          }
        }
      }
      return removed;
    },

    /** A path in the upload folder for a file made on the server (the demo seed's drawings). */
    async writeTemporary(data: Buffer, originalName: string): Promise<ReceivedFile> {
      await mkdir(uploads, { recursive: true });
      const p = path.join(uploads, `${randomBytes(16).toString("hex")}.upload`);
      await writeFile(p, data);
      return { path: p, originalName, size: data.length };
    },
  };
}
export type UploadArea = ReturnType<typeof createUploadArea>;

/** Only the last path segment of a sent file name, without control characters, bounded. */
function decodeName(name: string): string {
  return (name.split(/[\\/]/).pop() ?? "").replace(/[\u0000-\u001f\u007f]/g, "").slice(0, 255) || "photo";
}

/**
 * The media folder the test suite shares between the demo seed and the test apps of one
 * test database, outside the repository's own media/.
 */
export function testMediaDirFor(databaseName: string): string {
  return path.join(os.tmpdir(), `plumbline-media-${databaseName.replace(/[^a-zA-Z0-9_-]/g, "")}`);
}

/** A stored file ready to be sent: opened whole or in part, or handed out as the store's own URL. */
export interface StoredFile {
  contentType: string;
  /** The bytes, whole or the inclusive range given; null when the key holds none. */
  open(range?: ByteRange): Promise<{ stream: Readable; bytes: number; size: number } | null>;
  /**
   * The store's own short-lived URL for the file (a redirect target) when private files are
   * delivered that way (MEDIA_PRIVATE_DELIVERY=presigned on S3); null when they are streamed.
   */
  presigned(disposition?: string): Promise<string> | null;
}

export function storedFile(storage: MediaStorage, key: string, contentType: string): StoredFile {
  return {
    contentType,
    open: (range) => storage.stream(key, range),
    presigned: (disposition) =>
      storage.presignedUrl && storage.presignSeconds ? storage.presignedUrl(key, storage.presignSeconds, { contentType, disposition }) : null,
  };
}
