import { formatLocalDateTime } from "#shared/domain/locale-dates.ts";
import type { MediaStatus, Sensitivity } from "#shared/schemas/media.ts";

/** Each state by a word and a shape of its own, so nobody needs the colour to read it. */
export const STATUS_WORD: Record<MediaStatus, { glyph: string; word: string; tone: string }> = {
  processing: { glyph: "◌", word: "Processing", tone: "text-ink-soft" },
  ready: { glyph: "●", word: "Ready", tone: "text-good" },
  failed: { glyph: "✕", word: "Failed", tone: "text-bad" },
};

export const SENSITIVITY_WORD: Record<Sensitivity, { glyph: string; word: string; tone: string }> = {
  unreviewed: { glyph: "◌", word: "Not yet reviewed", tone: "text-watch" },
  cleared: { glyph: "✓", word: "Cleared", tone: "text-good" },
  restricted: { glyph: "■", word: "Restricted", tone: "text-bad" },
};

// File sizes are worded once for every feature (the document library too).
export { formatBytes } from "../../lib/format.ts";

/** A camera's local capture time (`YYYY-MM-DDTHH:mm…`) as "14 Mar 2026, 10:20", never shifted by a zone. */
export function formatTakenAt(takenAt: string | null): string {
  if (!takenAt) return "No capture time";
  return formatLocalDateTime(takenAt) ?? takenAt;
}
