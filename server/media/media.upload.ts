import type { MediaStatus, MediaUploadResult, RefusedFile } from "#shared/schemas/media.ts";
import { AppError } from "../core/app-error.ts";
import { runLimited } from "../core/run-limited.ts";
import type { Actor } from "../core/types.ts";
import { resolveProject, type MediaContext } from "./media.context.ts";
import { originalKey, removeLocation } from "./media.originals.ts";
import { probeImage, type ProbedImage } from "./media.probe.ts";
import { countItemsWithOriginal, findMediaBySha, insertMedia } from "./media.repository.ts";
import { insertJob } from "./media.queue.repository.ts";
import type { ReceivedFile } from "./media.storage.ts";

function refusal(refused: RefusedFile[], total: number): AppError {
  const first = refused[0]!;
  const sameCode = refused.every((r) => r.code === first.code);
  const message =
    total === 1
      ? `${first.name}: ${first.message}`
      : `${refused.length} of ${total} files were refused, so none of the ${total} was kept. ${refused.map((r) => `${r.name}: ${r.message}`).join(" ")}`;
  return new AppError(
    sameCode ? first.code : "files_refused",
    message,
    first.status,
    Object.fromEntries(refused.map((r) => [`files.${r.index}`, `${r.name}: ${r.message}`])),
    { files: refused },
  );
}

/** Taking photos in: one upload request, all or nothing. `onQueued` wakes this process's worker. */
export function createMediaUpload(ctx: MediaContext, onQueued: () => void) {
  const { db, storage, uploads, projects, limits } = ctx;

  /** The original without its location, or the refusal of the whole request. */
  async function withoutLocation(data: Buffer, image: ProbedImage, name: string, index: number, total: number): Promise<Buffer> {
    const clean = await removeLocation(data, image);
    if (!clean.ok) throw refusal([{ index, name, code: "location_not_removable", status: 422, message: clean.message }], total);
    return clean.bytes;
  }

  return {
    /**
     * Takes the files of one upload request. Every file is checked first (real type from
     * the bytes, size, declared pixels, a full decode); if any is refused the whole request
     * is refused, naming each bad file, and nothing is kept. Identical bytes already in the
     * project are offered instead of a copy (`duplicateOf`). The rest are stored under
     * content-hashed keys, then their rows and processing jobs are committed together; the
     * answer comes at once with status `processing`. Temporary files are always removed.
     */
    async upload(
      input: { project?: string; files: ReceivedFile[]; isIllustration?: boolean },
      actor: Actor,
    ): Promise<MediaUploadResult[]> {
      const files = input.files;
      try {
        if (files.length === 0) {
          throw new AppError("no_files", "Choose at least one photo: send them as multipart/form-data in the field `files`.", 400, { files: "is required" });
        }
        if (files.length > limits.maxFiles) {
          throw new AppError("too_many_files", `At most ${limits.maxFiles} files can be uploaded at once; ${files.length} were sent.`, 413, { files: `at most ${limits.maxFiles}` });
        }
        const project = await resolveProject(projects, input.project);
        const probes = await runLimited(files, 2, (f) => probeImage(f.path, { maxPixels: limits.maxPixels, maxBytes: limits.maxFileBytes }));
        const refused: RefusedFile[] = [];
        probes.forEach((p, index) => {
          if (!p.ok) refused.push({ index, name: files[index]!.originalName, code: p.code, status: p.status, message: p.message });
        });
        if (refused.length > 0) throw refusal(refused, files.length);
        const images = probes as ProbedImage[];

        const results: Array<MediaUploadResult | null> = files.map(() => null);
        const firstOfSha = new Map<string, number>();
        const fresh: number[] = [];
        for (const [i, image] of images.entries()) {
          const existing = await findMediaBySha(db, project.id, image.sha256);
          if (existing) {
            results[i] = { id: existing.id, status: existing.status, name: files[i]!.originalName, width: existing.width, height: existing.height, takenAt: existing.takenAt, duplicateOf: existing.id };
          } else if (!firstOfSha.has(image.sha256)) {
            firstOfSha.set(image.sha256, i);
            fresh.push(i);
          }
        }

        const stored: string[] = [];
        const storedBytes = new Map<number, number>();
        try {
          for (const i of fresh) {
            const key = originalKey(images[i]!.sha256, images[i]!.mime);
            // The original is kept without its location (the contract: coordinates are never kept).
            const bytes = await withoutLocation(await uploads.read(files[i]!), images[i]!, files[i]!.originalName, i, files.length);
            await storage.put(key, bytes);
            storedBytes.set(i, bytes.length);
            stored.push(key);
          }
          await db.transaction(async (trx) => {
            for (const i of fresh) {
              const image = images[i]!;
              let id = await insertMedia(trx, {
                projectId: project.id,
                sha256: image.sha256,
                originalKey: originalKey(image.sha256, image.mime),
                originalName: files[i]!.originalName,
                mime: image.mime,
                bytes: storedBytes.get(i) ?? files[i]!.size,
                width: image.width,
                height: image.height,
                takenAt: image.takenAt,
                hadGps: image.hasGps,
                uploadedBy: actor.user?.id ?? null,
                isIllustration: input.isIllustration ?? false,
              });
              let status: MediaStatus = "processing";
              let duplicateOf: number | null = null;
              if (id === null) {
                // Another request stored the same photo a moment ago: offer that one.
                const other = await findMediaBySha(trx, project.id, image.sha256);
                if (!other) throw new AppError("conflict", "The same photo is being uploaded in another request; try again.", 409);
                id = other.id;
                status = other.status;
                duplicateOf = other.id;
              } else {
                await insertJob(trx, id);
              }
              results[i] = { id, status, name: files[i]!.originalName, width: image.width, height: image.height, takenAt: image.takenAt, duplicateOf };
            }
          });
        } catch (err) {
          // Nothing half-made: an original no row refers to goes again.
          for (const key of stored) {
            if ((await countItemsWithOriginal(db, key)) === 0) await storage.delete(key);
          }
          throw err;
        }
        // A second copy in the same request is a duplicate of the first.
        images.forEach((image, i) => {
          if (results[i]) return;
          const first = results[firstOfSha.get(image.sha256)!]!;
          results[i] = { ...first, name: files[i]!.originalName, duplicateOf: first.id };
        });
        if (fresh.length > 0) onQueued();
        return results as MediaUploadResult[];
      } finally {
        await uploads.discard(files);
      }
    },
  };
}
