/**
 * Search over a project's own words (decision 048): the site's short codes match exactly
 * ("HD-1", "2A", "kW"), longer words also by their simple plural or singular and as a prefix
 * ("chill" → "chillers"). Every word of the query must match somewhere in an item; the words
 * side by side in the query and in a field rank first ("Hall 2A" before a page naming a hall
 * and, elsewhere, 2A), and a title counts over a body.
 */

/** One field of an item: its text and how much a match in it counts (a title over a body). */
export interface SearchField {
  text: string;
  weight: number;
}

/** What the rules rank: an item's fields, the first of which is its title. */
export interface Searchable {
  fields: readonly SearchField[];
}

interface Token {
  /** Lower case, without accents, as compared. */
  norm: string;
  start: number;
  end: number;
}

// A word, or a code joined by hyphens, dots or plus signs ("HD-1", "N+1", "2.5"); a slash parts words ("kW/rack").
const TOKEN = /[\p{L}\p{N}]+(?:[-+.][\p{L}\p{N}]+)*\+?/gu;

/** Lower case without accents ("Café" → "cafe"). */
function normalise(word: string): string {
  return word.normalize("NFKD").replace(/\p{M}/gu, "").toLowerCase();
}

/** The words of a text with where each stands in it. */
export function tokensOf(text: string): Token[] {
  return [...text.matchAll(TOKEN)].map((m) => ({ norm: normalise(m[0]), start: m.index, end: m.index + m[0].length }));
}

/**
 * A code is matched exactly: it carries a digit or a joiner, or is at most three letters
 * ("2a", "hd-1", "kw", "n+1"), so "2A" never finds "2AB" and "kW" never finds "kWh".
 */
function isCode(term: string): boolean {
  return term.length <= 3 || /[\d\-+.]/.test(term);
}

/** The simple singular of an English plural: "chillers" → "chiller", "batteries" → "battery", "busses" → "buss". */
function singular(word: string): string {
  if (word.length > 4 && word.endsWith("ies")) return `${word.slice(0, -3)}y`;
  if (word.length > 4 && /(?:ss|sh|ch|x|z)es$/.test(word)) return word.slice(0, -2);
  if (word.length > 3 && word.endsWith("s") && !word.endsWith("ss")) return word.slice(0, -1);
  return word;
}

/** How well one word of a text answers one word of the query: 0 (not at all) … 1 (the same word). */
function matchOf(term: string, token: string): number {
  if (token === term) return 1;
  // A joined word answers for its parts ("ready-for-service" for "service", "kw-rated" for "kw"),
  // but a code with a figure only as itself ("hd-1" is not "hd", "2a-1" is not "2a").
  const parts = /[-+.]/.test(token) && !/\d/.test(token) ? token.split(/[-+.]/) : [];
  if (isCode(term)) return parts.includes(term) ? 0.8 : 0;
  return Math.max(...[token, ...parts].map((w) => (w === term ? 0.95 : singular(w) === singular(term) ? 0.9 : w.startsWith(term) ? 0.6 : 0)));
}

/** The words of a query, each once, in order (punctuation alone gives none). */
export function queryTerms(query: string): string[] {
  return [...new Set(tokensOf(query).map((t) => t.norm))];
}

/** Where the query's words match in a text (by token index), and the best match of each word. */
function matchesIn(terms: readonly string[], tokens: readonly Token[]): { best: number[]; hits: Array<{ token: number; term: number }> } {
  const best = terms.map(() => 0);
  const hits: Array<{ token: number; term: number }> = [];
  tokens.forEach((tok, i) =>
    terms.forEach((term, j) => {
      const m = matchOf(term, tok.norm);
      if (m > 0) {
        hits.push({ token: i, term: j });
        best[j] = Math.max(best[j]!, m);
      }
    }),
  );
  return { best, hits };
}

/** The query's words side by side, in order, somewhere in these tokens. */
function hasPhrase(terms: readonly string[], hits: ReadonlyArray<{ token: number; term: number }>): boolean {
  if (terms.length < 2) return false;
  const at = new Set(hits.map((h) => `${h.token}:${h.term}`));
  return hits.some((h) => h.term === 0 && terms.every((_, j) => at.has(`${h.token + j}:${j}`)));
}

/**
 * The item's score for a query, or 0 when a word of the query matches none of its fields.
 * Per word, its best match in each field times the field's weight, summed; the words side by
 * side in a field add three times that field's weight per word.
 */
export function scoreOf(item: Searchable, terms: readonly string[]): number {
  if (terms.length === 0) return 0;
  const found = terms.map(() => false);
  let score = 0;
  for (const field of item.fields) {
    const { best, hits } = matchesIn(terms, tokensOf(field.text));
    best.forEach((m, j) => {
      if (m > 0) found[j] = true;
      score += m * field.weight;
    });
    if (hasPhrase(terms, hits)) score += 3 * field.weight * terms.length;
  }
  return found.every(Boolean) ? score : 0;
}

const ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

/** Text safe inside HTML. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ESCAPES[c]!);
}

/**
 * About `length` characters of the text around its first match (or from its start, `fromStart`:
 * a title that matched already says why), escaped, with every matched word inside
 * `<mark>…</mark>` (the only markup the snippet carries); the text's start when nothing matches. Cut at word boundaries, with "…" where text was left out.
 */
export function snippetOf(text: string, terms: readonly string[], opts: { length?: number; fromStart?: boolean } = {}): string {
  const length = opts.length ?? 180;
  const flat = text.replace(/\s+/g, " ").trim();
  const tokens = tokensOf(flat);
  const marked = tokens.filter((t) => terms.some((term) => matchOf(term, t.norm) > 0));
  const first = opts.fromStart ? 0 : (marked[0]?.start ?? 0);
  let from = Math.max(0, first - Math.floor(length / 3));
  // Start after a space, unless that would pass the first match (a very long word).
  const space = from > 0 ? flat.indexOf(" ", from) + 1 : 0;
  if (space > 0 && space <= first) from = space;
  let to = Math.min(flat.length, from + length);
  if (to < flat.length) to = flat.lastIndexOf(" ", to) > first ? flat.lastIndexOf(" ", to) : to;
  let out = "";
  let at = from;
  for (const t of marked) {
    if (t.start < from || t.end > to) continue;
    out += `${escapeHtml(flat.slice(at, t.start))}<mark>${escapeHtml(flat.slice(t.start, t.end))}</mark>`;
    at = t.end;
  }
  out += escapeHtml(flat.slice(at, to));
  return `${from > 0 ? "…" : ""}${out}${to < flat.length ? "…" : ""}`;
}
