import { createHash } from "node:crypto";
import type { System } from "#shared/schemas/programme.ts";
import type { Topics } from "#shared/schemas/subscribers.ts";

/** Sorted, without repeats; `null` stays "every topic". */
export function normaliseTopics(t: Topics | null | undefined): Topics | null {
  if (!t) return null;
  const areas = [...new Set(t.areas.map((a) => a.trim()))].sort();
  const systems = [...new Set(t.systems)].sort() as System[];
  return { areas, systems };
}

/**
 * A stable key for a subscriber's topics: "all", or the SHA-256 of the canonical JSON.
 * Subscribers with the same audience, key and window get the same digest content.
 */
export function topicsKey(t: Topics | null): string {
  const n = normaliseTopics(t);
  if (!n) return "all";
  return createHash("sha256").update(JSON.stringify(n)).digest("hex");
}

/**
 * Whether an item (a post, a programme move) tagged with these areas and systems is
 * within a subscriber's topics: every topic, or any chosen area, or any chosen system.
 * An item with no tags at all is general news and reaches everyone.
 */
export function topicsAllow(t: Topics | null, item: { areas: readonly string[]; systems: readonly string[] }): boolean {
  if (!t) return true;
  if (item.areas.length === 0 && item.systems.length === 0) return true;
  return item.areas.some((a) => t.areas.includes(a)) || item.systems.some((s) => (t.systems as string[]).includes(s));
}

/** `area:Hall 2A` / `system:cooling` → the kind and value of one topic. */
export function parseTopicRef(ref: string): { kind: "area" | "system"; value: string } {
  const i = ref.indexOf(":");
  return { kind: ref.slice(0, i) === "system" ? "system" : "area", value: ref.slice(i + 1) };
}
