/**
 * Photos and updates tagged with a capacity block or a plant system: which tags content may
 * carry, and which of them a reader may see. Pure: the blocks and systems of the project come in.
 */
import type { Audience } from "../schemas/common.ts";
import { audiencesFor, type Viewer } from "./audience.ts";

/** The two facility tag kinds; a tag's value is the block's or system's id as text. */
export type FacilityTagKind = "block" | "plant";

/** A block or a plant system of a project, as tags need it. */
export interface FacilityTagSubject {
  kind: FacilityTagKind;
  id: number;
  name: string;
  audience: Audience;
}

const WORD: Record<FacilityTagKind, string> = { block: "capacity block", plant: "plant system" };

/** Who may read content of an audience: internal content is read by staff only. */
const viewerOfContent = (audience: Audience): Viewer => (audience === "internal" ? "staff" : audience);

/**
 * Why content may not carry these facility tags, in words, or null when it may. Each id must be
 * a block (or system) of the content's own project, and one whose audience the content's readers
 * may see: a public update cannot name an investor-only block, nor a photo that can be published
 * an internal system (`reach` is the widest audience the content can be shown to).
 */
export function facilityTagProblem(kind: FacilityTagKind, ids: readonly number[], subjects: readonly FacilityTagSubject[], reach: Audience): string | null {
  const mine = new Map(subjects.filter((s) => s.kind === kind).map((s) => [s.id, s]));
  const unknown = ids.filter((id) => !mine.has(id));
  if (unknown.length > 0) return `${WORD[kind]} ${unknown.map((id) => `#${id}`).join(", ")} is not in this project's facility`;
  const allowed = audiencesFor(viewerOfContent(reach));
  const hidden = ids.map((id) => mine.get(id)!).filter((s) => !allowed.includes(s.audience));
  if (hidden.length > 0) {
    return `${hidden.map((s) => `“${s.name}” (${s.audience})`).join(", ")} cannot be shown to ${reach === "public" ? "the public" : `${reach} readers`}`;
  }
  return null;
}

/** The facility tags of a piece of content that a viewer may see, with their names (the rest are left out, unnamed). */
export function visibleFacilityTags(
  tags: ReadonlyArray<{ kind: string; value: string }>,
  subjects: readonly FacilityTagSubject[],
  viewer: Viewer,
): FacilityTagSubject[] {
  const allowed = audiencesFor(viewer);
  const out: FacilityTagSubject[] = [];
  for (const t of tags) {
    if (t.kind !== "block" && t.kind !== "plant") continue;
    const s = subjects.find((x) => x.kind === t.kind && String(x.id) === t.value);
    if (s && allowed.includes(s.audience)) out.push(s);
  }
  return out;
}

/** A block or system the viewer may see, or null (unknown, another project's, or hidden from them). */
export function visibleFacilitySubject(kind: FacilityTagKind, id: number, subjects: readonly FacilityTagSubject[], viewer: Viewer): FacilityTagSubject | null {
  const s = subjects.find((x) => x.kind === kind && x.id === id);
  return s && audiencesFor(viewer).includes(s.audience) ? s : null;
}

/** What photos and updates ask of the facility (server/facility): a project's blocks and plant systems. */
export interface FacilityForTags {
  tagSubjects(projectId: number): Promise<FacilityTagSubject[]>;
}

/** Without the facility (a seed's own services), a project has no block or system to tag with. */
export const NO_FACILITY: FacilityForTags = { tagSubjects: async () => [] };
