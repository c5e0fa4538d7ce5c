/**
 * Who reads what. Every milestone, update, photo story, capacity block and document has an
 * audience; a visitor reads the public ones, an investor the public and investor ones, staff
 * (admin, lead, marketing) all three. Updates and photo stories are, besides, hidden from all
 * but staff until they are published.
 */
import type { Audience, Role } from "../schemas/common.ts";

/** Who is reading: a visitor, an investor, or staff (admin, lead, marketing). */
export type Viewer = "public" | "investor" | "staff";

const VISIBLE: Record<Viewer, readonly Audience[]> = {
  public: ["public"],
  investor: ["public", "investor"],
  staff: ["public", "investor", "internal"],
};

/** The audiences a viewer may read. */
export function audiencesFor(viewer: Viewer): readonly Audience[] {
  return VISIBLE[viewer];
}

/** The viewer a signed-in role (or a visitor, `null`) reads as. */
export function viewerOfRole(role: Role | null | undefined): Viewer {
  if (!role) return "public";
  return role === "investor" ? "investor" : "staff";
}
