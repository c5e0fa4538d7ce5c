import { z } from "zod";
import { plainText } from "./text.ts";

/** GET /api/projects/:slug/search?q= : the words to find (fixed interface). */
export const SearchQuerySchema = z.strictObject({
  q: plainText().min(1, "is empty: type a word or a code, for example HD-1").max(200, "must be at most 200 characters"),
});
export type SearchQuery = z.infer<typeof SearchQuerySchema>;

/** What a result is, in the order the page groups them. */
export const SEARCH_KINDS = ["block", "system", "milestone", "update", "story"] as const;
export type SearchKind = (typeof SEARCH_KINDS)[number];

/** One result: `snippet` is escaped text whose only markup is `<mark>` around the matched words. */
export interface SearchResult {
  kind: SearchKind;
  title: string;
  url: string;
  snippet: string;
}

/** The answer (fixed interface): every match counted in `total`, the best first in `results`. */
export interface SearchAnswer {
  total: number;
  results: SearchResult[];
}

/** The most results one answer lists (`total` still counts them all). */
export const SEARCH_MAX_RESULTS = 50;
