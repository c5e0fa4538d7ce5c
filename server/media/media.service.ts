import { NO_FACILITY, type FacilityForTags } from "#shared/domain/facility-tags.ts";
import type { Db } from "../db/knex.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { createAccountsService } from "../users/users.accounts.ts";
import type { MediaContext, MediaLimits } from "./media.context.ts";
import { createItemReader } from "./media.items.ts";
import { createMediaLibrary } from "./media.library.ts";
import { createMediaLinks } from "./media.links.ts";
import { createMediaOriginals } from "./media.originals.ts";
import { createMediaPairs } from "./media.pairs.ts";
import { createMediaPictures } from "./media.pictures.ts";
import { createMediaPressKit } from "./media.press-kit.ts";
import { createMediaQueue } from "./media.queue.ts";
import type { MediaStorage, UploadArea } from "./media.storage.ts";
import { createMediaUpload } from "./media.upload.ts";

/**
 * The media module's one service, composed of its use cases: taking photos in (media.upload.ts),
 * the site office's library and review (media.library.ts), the processing queue the worker in
 * media.jobs.ts drains (media.queue.ts), derivative files and signed links (media.links.ts), the
 * stored originals (media.originals.ts), and what posts, stories, the public site and the
 * programme ask of photos (media.pictures.ts), and press kits' reads and files (media.press-kit.ts),
 * then-and-now pairs and the fingerprint backfill (media.pairs.ts).
 */
export function createMediaService(deps: {
  db: Db;
  storage: MediaStorage;
  uploads: UploadArea;
  projects: ProjectsService;
  programme: MediaContext["programme"];
  /** The users module's accounts (people's names); by default one over `db` (it keeps no state). */
  accounts?: MediaContext["accounts"];
  limits: MediaLimits;
  /** The facility's blocks and systems, for block and plant tags (without it, none can be tagged). */
  facility?: FacilityForTags;
  /** config TOKEN_SECRET; without it no signed link is made or accepted (the seed needs none). */
  tokenSecret?: string;
}) {
  const ctx: MediaContext = { db: deps.db, storage: deps.storage, uploads: deps.uploads, projects: deps.projects, programme: deps.programme, accounts: deps.accounts ?? createAccountsService({ db: deps.db }), facility: deps.facility ?? NO_FACILITY, limits: deps.limits };
  const items = createItemReader(ctx);
  const { notifyQueued, ...queue } = createMediaQueue(ctx, items);
  const pictures = createMediaPictures(ctx);
  return {
    limits: ctx.limits,
    ...createMediaUpload(ctx, notifyQueued),
    ...createMediaLibrary(ctx, items),
    ...queue,
    ...createMediaOriginals(ctx),
    ...createMediaLinks(ctx, deps.tokenSecret),
    ...pictures,
    ...createMediaPairs(ctx, pictures.pictureFor),
    ...createMediaPressKit(ctx),
  };
}
export type MediaService = ReturnType<typeof createMediaService>;
