import type { EnquiryKind, EnquiryRow, EnquiryStatus } from "#shared/schemas/enquiries.ts";
import { formatDate } from "../../lib/format.ts";

export const KIND_WORD: Record<EnquiryKind, string> = { capacity: "Capacity", visit: "Site visit", general: "Question" };

/** Status by shape and word, never colour alone. */
export const ENQUIRY_STATUS_LOOK: Record<EnquiryStatus, { glyph: string; word: string; className: string }> = {
  new: { glyph: "◆", word: "New", className: "font-semibold text-ink" },
  contacted: { glyph: "◐", word: "Contacted", className: "text-ink" },
  closed: { glyph: "●", word: "Closed", className: "text-ink-faint" },
};

export function enquirySummary(e: EnquiryRow): string {
  if (e.kind === "capacity") return `${e.racks} racks at ${e.kwPerRack} kW, by ${e.neededBy ? formatDate(e.neededBy) : "—"}`;
  if (e.kind === "visit") return `${e.partySize} ${e.partySize === 1 ? "person" : "people"}; ${e.preferredDates.map((d) => formatDate(d)).join(" or ")}`;
  return (e.message ?? "").slice(0, 80) + ((e.message ?? "").length > 80 ? "…" : "");
}
