import type { FacilityForTags } from "#shared/domain/facility-tags.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { AppError } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import type { MediaStorage, UploadArea } from "./media.storage.ts";

export interface MediaLimits {
  /** Largest file, bytes. */
  maxFileBytes: number;
  /** Most files in one upload request. */
  maxFiles: number;
  /** Most pixels (width × height) an image may declare. */
  maxPixels: number;
}

/** What every media use case (media.upload, .library, .queue, .links, .originals, .pictures) is built from. */
export interface MediaContext {
  db: Db;
  storage: MediaStorage;
  uploads: UploadArea;
  projects: ProjectsService;
  /** The milestones and areas a photo may be tagged with are the programme's. */
  programme: Pick<ProgrammeService, "allAreas" | "milestoneNames" | "milestoneIdsOf">;
  /** People's names (who uploaded, who reviewed) are the users module's. */
  accounts: Pick<AccountsService, "namesOf">;
  /** The capacity blocks and plant systems a photo may be tagged with are the facility's. */
  facility: FacilityForTags;
  limits: MediaLimits;
}

/** The project a library request names, or the site office's default: the first project by name. */
export async function resolveProject(projects: ProjectsService, slug: string | undefined): Promise<Project> {
  if (slug) return projects.get(slug);
  const first = (await projects.list())[0];
  if (!first) throw new AppError("no_project", "There is no project yet to hold photos.", 422);
  return first;
}
