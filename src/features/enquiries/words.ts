import type { EnquiryKind, EnquiryRow, EnquiryStatus } from "#shared/schemas/enquiries.ts";

export const KIND_WORD: Record<EnquiryKind, string> = { capacity: "Capacity", visit: "Site visit", general: "Question" };

/** Status by shape and word, never colour alone. */
export const ENQUIRY_STATUS_LOOK: Record<EnquiryStatus, { glyph: string; word: string; className: string }> = {
  new: { glyph: "◆", word: "New", className: "text-accent" },
  contacted: { glyph: "○", word: "Contacted", className: "text-ink" },
  closed: { glyph: "●", word: "Closed", className: "text-ink-faint" },
};

const dateFmt = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
/** A calendar date (`YYYY-MM-DD`) for people; formatted in UTC so it never shifts a day. */
export function day(d: string): string {
  const [y, m, dd] = d.split("-").map(Number) as [number, number, number];
  return dateFmt.format(new Date(Date.UTC(y, m - 1, dd)));
}

export function enquirySummary(e: EnquiryRow): string {
  if (e.kind === "capacity") return `${e.racks} racks at ${e.kwPerRack} kW, by ${e.neededBy ? day(e.neededBy) : "—"}`;
  if (e.kind === "visit") return `${e.partySize} ${e.partySize === 1 ? "person" : "people"}; ${e.preferredDates.map(day).join(" or ")}`;
  return (e.message ?? "").slice(0, 80) + ((e.message ?? "").length > 80 ? "…" : "");
}
