/**
 * A word diff of two plain texts (Myers' O((N+M)·D) shortest edit script, E. W. Myers,
 * "An O(ND) Difference Algorithm and Its Variations", Algorithmica 1, 1986).
 * Tokens are words, runs of spaces and single newlines, so the result keeps the text's lines.
 */

export interface DiffPart {
  op: "equal" | "insert" | "delete";
  text: string;
}

/** Splits text into words, runs of spaces and single newlines; joining the tokens gives the text back. */
export function tokenize(text: string): string[] {
  return text.match(/\n|[^\S\n]+|[^\s]+/g) ?? [];
}

/** The shortest edit script from `a` to `b` as equal/delete/insert runs of tokens. */
export function diffTokens(a: readonly string[], b: readonly string[]): Array<{ op: DiffPart["op"]; tokens: string[] }> {
  const n = a.length;
  const m = b.length;
  const max = n + m;
  const offset = max;
  const v = new Int32Array(2 * max + 2);
  const trace: Int32Array[] = [];
  let found = false;
  for (let d = 0; d <= max && !found; d++) {
    trace.push(v.slice());
    for (let k = -d; k <= d; k += 2) {
      let x: number;
      if (k === -d || (k !== d && v[offset + k - 1]! < v[offset + k + 1]!)) x = v[offset + k + 1]!;
      else x = v[offset + k - 1]! + 1;
      let y = x - k;
      while (x < n && y < m && a[x] === b[y]) {
        x++;
        y++;
      }
      v[offset + k] = x;
      if (x >= n && y >= m) {
        found = true;
        break;
      }
    }
  }
  // Walk the trace back from (n, m) to (0, 0).
  const steps: Array<{ op: DiffPart["op"]; token: string }> = [];
  let x = n;
  let y = m;
  for (let d = trace.length - 1; d >= 0 && (x > 0 || y > 0); d--) {
    const vd = trace[d]!;
    const k = x - y;
    let prevK: number;
    if (k === -d || (k !== d && vd[offset + k - 1]! < vd[offset + k + 1]!)) prevK = k + 1;
    else prevK = k - 1;
    const prevX = d === 0 ? 0 : vd[offset + prevK]!;
    const prevY = prevX - prevK;
    while (x > prevX && y > prevY) {
      steps.push({ op: "equal", token: a[x - 1]! });
      x--;
      y--;
    }
    if (d === 0) break;
    if (x === prevX) steps.push({ op: "insert", token: b[y - 1]! });
    else steps.push({ op: "delete", token: a[x - 1]! });
    x = prevX;
    y = prevY;
  }
  while (x > 0 && y > 0) {
    steps.push({ op: "equal", token: a[x - 1]! });
    x--;
    y--;
  }
  steps.reverse();
  const runs: Array<{ op: DiffPart["op"]; tokens: string[] }> = [];
  for (const s of steps) {
    const last = runs[runs.length - 1];
    if (last && last.op === s.op) last.tokens.push(s.token);
    else runs.push({ op: s.op, tokens: [s.token] });
  }
  return runs;
}

/** A word diff of two texts, with the number of words inserted and deleted. */
export function diffText(before: string, after: string): { parts: DiffPart[]; inserted: number; deleted: number } {
  const runs = diffTokens(tokenize(before), tokenize(after));
  const words = (tokens: string[]) => tokens.filter((t) => /\S/.test(t)).length;
  let inserted = 0;
  let deleted = 0;
  const parts: DiffPart[] = [];
  for (const r of runs) {
    if (r.op === "insert") inserted += words(r.tokens);
    if (r.op === "delete") deleted += words(r.tokens);
    parts.push({ op: r.op, text: r.tokens.join("") });
  }
  return { parts, inserted, deleted };
}
