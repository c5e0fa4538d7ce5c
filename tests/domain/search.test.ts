import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { escapeHtml, queryTerms, scoreOf, snippetOf, tokensOf } from "../../src/shared/domain/search.ts";

// Common practice (no published source): the matching rules of decision 048, on our own invented words.
const item = (title: string, body = "") => ({ fields: [{ text: title, weight: 3 }, { text: body, weight: 1 }] });
const finds = (q: string, title: string, body = "") => scoreOf(item(title, body), queryTerms(q)) > 0;

describe("search matching (decision 048)", () => {
  it.each([
    // query, title, body, found
    ["HD-1", "HD-1 containment goes up", "", true],
    ["hd-1", "HD-1", "", true],
    ["HD-1", "HD-10 shell", "", false],
    ["HD", "HD-1 containment goes up", "", false],
    ["2A", "Hall 2A steel", "", true],
    ["2A", "Hall 2AB", "", false],
    ["2A", "Hall 2B", "", false],
    ["2A", "Halls 2A/2B roofed", "", true],
    ["kW", "400 kW chillers", "", true],
    ["kW", "12 kWh battery", "", false],
    ["kW", "kW/rack", "", true],
    ["chill", "Chillers on their plinths", "", true],
    ["chill", "", "the chiller bases", true],
    ["chiller", "Chillers", "", true],
    ["chillers", "Chiller 3", "", true],
    ["batteries", "Battery strings", "", true],
    ["generator", "Generators delivered", "", true],
    ["service", "Ready-for-service walk", "", true],
    ["Hall 2A", "Hall 2B ready", "the halls are dry", false],
    ["Hall 2A", "Hall 2B ready", "built with Hall 2A", true],
    ["café", "Cafe area", "", true],
  ])("%j in %j / %j → %s", (q, title, body, found) => {
    expect(finds(q, title, body)).toBe(found);
  });

  it("ranks a title over a body, the exact word over a prefix, and words side by side over apart", () => {
    const rank = (q: string, a: ReturnType<typeof item>, b: ReturnType<typeof item>) => scoreOf(a, queryTerms(q)) > scoreOf(b, queryTerms(q));
    expect(rank("chillers", item("Chillers"), item("Plant", "chillers"))).toBe(true);
    expect(rank("chiller", item("Chiller"), item("Chillerplant"))).toBe(true);
    expect(rank("Hall 2A", item("Hall 2A steel"), item("Hall 2B and 2A"))).toBe(true);
  });

  it("gives no words for punctuation alone, and one of each word", () => {
    expect(queryTerms("!!! -- ''")).toEqual([]);
    expect(queryTerms("Hall hall 2A")).toEqual(["hall", "2a"]);
    expect(tokensOf("N+1 and HD-1.").map((t) => t.norm)).toEqual(["n+1", "and", "hd-1"]);
  });

  it("marks the matched words and escapes everything else in a snippet", () => {
    expect(snippetOf("Four <b>chillers</b> & a pump", ["chill"])).toBe("Four &lt;b&gt;<mark>chillers</mark>&lt;/b&gt; &amp; a pump");
    const long = `${"word ".repeat(80)}the HD-1 suite ${"more ".repeat(80)}`;
    const s = snippetOf(long, ["hd-1"]);
    expect(s.startsWith("…") && s.endsWith("…")).toBe(true);
    expect(s).toContain("<mark>HD-1</mark>");
    expect(s.length).toBeLessThan(220);
    // From the start when the title already matched: the body's opening words, marks kept.
    expect(snippetOf(long, ["hd-1"], { fromStart: true }).startsWith("word word")).toBe(true);
    expect(snippetOf("HD-1: 20 racks at up to 25 kW", ["kw"], { fromStart: true })).toBe("HD-1: 20 racks at up to 25 <mark>kW</mark>");
  });

  it("never lets markup through a snippet, whatever the text and query", () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 400, unit: fc.constantFrom("a", "b", "2", " ", "<", ">", "&", "-", "\n") }), fc.string({ maxLength: 6, unit: fc.constantFrom("a", "b", "2", " ", "-") }), (text, q) => {
        const out = snippetOf(text, queryTerms(q));
        expect(out.replace(/<\/?mark>/g, "")).not.toMatch(/[<>]/);
        // What is left between the marks is a piece of the text, escaped.
        expect(escapeHtml(text.replace(/\s+/g, " ").trim())).toContain(out.replace(/<\/?mark>/g, "").replace(/^…|…$/g, ""));
      }),
    );
  });
});
