import type { Frequency, Interest, SubscriberStatus, Topics } from "#shared/schemas/subscribers.ts";
import { SYSTEM_WORD } from "../../lib/format.ts";

export const INTEREST_WORD: Record<Interest, string> = {
  prospect: "I may lease space here",
  investor: "Investor or lender",
  press: "Press",
  neighbour: "Neighbour",
};

/** Short forms for tables. */
export const INTEREST_SHORT: Record<Interest, string> = { prospect: "Prospect", investor: "Investor", press: "Press", neighbour: "Neighbour" };

export const FREQUENCY_WORD: Record<Frequency, string> = {
  immediate: "As it happens (one e-mail per update)",
  weekly: "Weekly, on Monday morning",
  monthly: "Monthly, on the first working day",
};

export const FREQUENCY_SHORT: Record<Frequency, string> = { immediate: "As it happens", weekly: "Weekly", monthly: "Monthly" };

/** Status by shape and word together, never by colour alone. */
export const STATUS_LOOK: Record<SubscriberStatus, { glyph: string; word: string; className: string }> = {
  pending: { glyph: "◌", word: "Waiting to confirm", className: "text-ink-soft" },
  confirmed: { glyph: "●", word: "Subscribed", className: "text-good" },
  unsubscribed: { glyph: "—", word: "Left", className: "text-ink-faint" },
  bounced: { glyph: "✕", word: "Bounced", className: "text-bad" },
  complained: { glyph: "▲", word: "Reported as spam", className: "text-bad" },
};

export function topicsWords(t: Topics | null): string {
  if (!t) return "Everything";
  return [...t.areas, ...t.systems.map((s) => SYSTEM_WORD[s])].join(", ");
}
