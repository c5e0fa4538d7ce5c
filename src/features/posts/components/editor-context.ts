import { createContext, useContext } from "react";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import type { Milestone } from "#shared/schemas/programme.ts";

/**
 * What the editor's photo and milestone blocks need to draw themselves: the pictures
 * and milestones they name, and the refusals that point at them. The node views render
 * inside the editor's React tree, so they read this context directly.
 */
export interface EditorData {
  pictures: ReadonlyMap<number, MediaPicture>;
  milestones: ReadonlyMap<number, Milestone>;
  problems: readonly PublishingProblem[];
  /** Opens the alt-text (or clearance) fix for a photo. */
  onFixPhoto: (mediaId: number) => void;
}

export const EditorDataContext = createContext<EditorData>({ pictures: new Map(), milestones: new Map(), problems: [], onFixPhoto: () => undefined });

export const useEditorData = () => useContext(EditorDataContext);
