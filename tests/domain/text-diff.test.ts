import { describe, expect, it } from "vitest";
import { diffText, diffTokens, tokenize } from "../../src/shared/domain/text-diff.ts";

const editCount = (runs: ReturnType<typeof diffTokens>) => runs.filter((r) => r.op !== "equal").reduce((n, r) => n + r.tokens.length, 0);
const side = (runs: ReturnType<typeof diffTokens>, skip: "insert" | "delete") => runs.filter((r) => r.op !== skip).flatMap((r) => r.tokens).join("");

describe("the revision diff (Myers' shortest edit script)", () => {
  it("finds the shortest edit script of the paper's example: ABCABBA → CBABAC in 5 edits", () => {
    // Source: E. W. Myers, "An O(ND) Difference Algorithm and Its Variations", Algorithmica 1
    // (1986), Fig. 1: A = ABCABBA, B = CBABAC, D = 5 (the longest common subsequence has length 4).
    const runs = diffTokens([..."ABCABBA"], [..."CBABAC"]);
    expect(editCount(runs)).toBe(5);
    expect(side(runs, "insert")).toBe("ABCABBA");
    expect(side(runs, "delete")).toBe("CBABAC");
    expect(runs.filter((r) => r.op === "equal").reduce((n, r) => n + r.tokens.length, 0)).toBe(4);
  });

  it.each([
    ["", "", 0],
    ["", "abc", 3],
    ["abc", "", 3],
    ["abc", "abc", 0],
    ["abcd", "acbd", 2],
  ])("%j → %j takes %i edits (our own examples)", (a, b, d) => {
    const runs = diffTokens([...a], [...b]);
    expect(editCount(runs)).toBe(d);
    expect(side(runs, "insert")).toBe(a);
    expect(side(runs, "delete")).toBe(b);
  });

  it("works on words and keeps the lines: joining the tokens gives the text back", () => {
    const text = "Chillers set.\n  Four of five  on plinths.\n";
    expect(tokenize(text).join("")).toBe(text);
    const d = diffText("Four chillers set.\nFuel tank tested.", "Five chillers set.\nFuel tank tested.\nGenerators delivered.");
    expect(d.parts).toEqual([
      { op: "delete", text: "Four" },
      { op: "insert", text: "Five" },
      { op: "equal", text: " chillers set.\nFuel tank tested." },
      { op: "insert", text: "\nGenerators delivered." },
    ]);
    expect([d.inserted, d.deleted]).toEqual([3, 1]);
  });
});
