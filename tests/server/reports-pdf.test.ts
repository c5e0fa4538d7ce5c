import { getDocument, OPS } from "pdfjs-dist/legacy/build/pdf.mjs";
import { beforeAll, describe, expect, it } from "vitest";
import { REPORT_SECTIONS } from "#shared/schemas/reports.ts";
import { commentaryBlocks } from "../../server/reports/reports.pdf-html.ts";
import { APPENDIX_TITLE, SECTION_TITLES, renderReportPdf } from "../../server/reports/reports.pdf.ts";
import { pageTexts } from "./documents-fixtures.ts";
import { photoLoader, reportFiguresFixture } from "./reports-pdf-fixtures.ts";

/**
 * The report PDF drawn from a hand-built set of figures, read back with pdfjs-dist (the reader
 * investors' browsers use): headings, running header, page numbers, metadata, embedded fonts,
 * tagging, vector charts and page one's figures.
 */

const figures = reportFiguresFixture(2);
const COMMENTARY = {
  summary: "<p>October was a <strong>hard month</strong> on the <em>chiller</em> front.</p><ul><li>Second supplier quoted</li><li>Temporary power &amp; fuel agreed</li></ul>",
  budget: "Plain text commentary on the budget.\n\nA second paragraph.",
};

let draft: Buffer;
let issued: Buffer;
let draftPages: string[];
let issuedPages: string[];

beforeAll(async () => {
  const loadImage = await photoLoader(figures, 400, 267);
  draft = await renderReportPdf(figures, COMMENTARY, { state: "draft", loadImage });
  issued = await renderReportPdf({ ...figures, state: "issued" }, {}, { state: "issued", issuedAt: "2026-11-05T10:00:00.000Z", loadImage });
  draftPages = await pageTexts(draft);
  issuedPages = await pageTexts(issued);
});

async function operators(bytes: Buffer, pageNumber: number): Promise<number[]> {
  const pdf = await getDocument({ data: new Uint8Array(bytes), verbosity: 0, isEvalSupported: false }).promise;
  const list = await (await pdf.getPage(pageNumber)).getOperatorList();
  await pdf.destroy();
  return list.fnArray;
}

const pageOf = (pages: string[], heading: string) => pages.findIndex((t) => t.includes(heading)) + 1;

describe("renderReportPdf", () => {
  it("has every section heading, in the report's order, then the appendix", () => {
    const all = draftPages.join("\n");
    const titles = [...REPORT_SECTIONS.map((s) => SECTION_TITLES[s]), APPENDIX_TITLE];
    const at = titles.map((t) => all.indexOf(t));
    for (const [i, title] of titles.entries()) expect(at[i], title).toBeGreaterThanOrEqual(0);
    expect([...at].sort((a, b) => a - b)).toEqual(at);
  });

  it("carries the running header with project, month and draft or issued, and 'Page n of N', on every page", () => {
    for (const [pages, state] of [
      [draftPages, "Draft, not issued"],
      [issuedPages, "Issued 5 Nov 2026"],
    ] as const) {
      expect(pages.length).toBeGreaterThanOrEqual(8);
      pages.forEach((text, i) => {
        expect(text).toContain("Aldermere Campus Phase 2 · Monthly report October 2026");
        expect(text).toContain(state);
        expect(text).toContain(`Page ${i + 1} of ${pages.length}`);
      });
    }
    expect(issuedPages.join("")).not.toContain("Draft");
  });

  it("sets title, author and language, and is A4 portrait", async () => {
    const pdf = await getDocument({ data: new Uint8Array(draft), verbosity: 0, isEvalSupported: false }).promise;
    const info = (await pdf.getMetadata()).info as Record<string, unknown>;
    expect(info.Title).toBe("Aldermere Campus Phase 2: monthly report, October 2026");
    expect(info.Author).toBe("Kestrel Colocation");
    expect(info.Language).toBe("en-GB");
    const view = (await pdf.getPage(1)).view;
    expect(view.map((v) => Math.round(v))).toEqual([0, 0, 595, 842]);
    await pdf.destroy();
  });

  it("is tagged: marked, with a structure tree and its headings", async () => {
    const pdf = await getDocument({ data: new Uint8Array(draft), verbosity: 0, isEvalSupported: false }).promise;
    expect(await pdf.getMarkInfo()).toMatchObject({ Marked: true });
    const tree = await (await pdf.getPage(1)).getStructTree();
    const roles: string[] = [];
    const walk = (n: { role?: string; children?: unknown[] }) => {
      if (n.role) roles.push(n.role);
      for (const c of n.children ?? []) walk(c as typeof n);
    };
    walk(tree as never);
    expect(roles).toEqual(expect.arrayContaining(["Sect", "H1", "H2", "P", "L", "LI", "Figure"]));
    await pdf.destroy();
  });

  it("embeds Inter for text and Source Serif 4 for commentary, and no standard font", () => {
    const raw = draft.toString("latin1");
    expect(raw).toMatch(/\/BaseFont \/[A-Z]{6}\+Inter-Regular/);
    expect(raw).toMatch(/\/BaseFont \/[A-Z]{6}\+Inter-Bold/);
    expect(raw).toMatch(/\/BaseFont \/[A-Z]{6}\+SourceSerif4-(Regular|Italic|Bold)/);
    expect(raw).toContain("/FontFile2");
    expect(raw).not.toMatch(/\/BaseFont \/(Helvetica|Times|Courier)/);
  });

  it("gives page one the summary's figures, as the fixture has them, in reading order", () => {
    const p1 = draftPages[0]!;
    expect(p1).toContain("61.4 % complete against 66.2 % planned by the month end (4.8 points behind)");
    expect(p1).toContain(figures.summary.spiSentence);
    expect(p1).toContain(figures.summary.spiTSentence);
    expect(p1).toContain("Hall 2A (1.2 MW): forecast ready 5 Feb 2027 against baseline 15 Jan 2027, 15 working days late");
    expect(p1).toContain("Hall 2B (1.2 MW): forecast ready 29 Apr 2027 against baseline 16 Apr 2027, 9 working days late");
    expect(p1).toContain("Current budget £48.3m; projected final cost £47.9m; contingency remaining £2.1m");
    for (const r of figures.summary.topRisks) expect(p1).toContain(`${r.reference} ${r.title}: ${r.band}, score ${r.score}`);
    expect(p1).toContain("D-04 Approve second chiller supplier: needed by 14 Nov 2026 (14 days left)");
    expect(p1).toContain("D-05 Release contingency for temporary power: needed by 28 Oct 2026 (3 days overdue)");
    const order = ["1. Summary", "Progress against plan", "Ready for service, block by block", "Budget position", "Top three risks", "Open decisions", "Commentary from the project lead"].map((h) => p1.indexOf(h));
    expect(order.every((at) => at >= 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
  });

  it("follows a section with the lead's commentary, HTML laid out as text and plain text as paragraphs", () => {
    const p1 = draftPages[0]!;
    expect(p1).toContain("October was a hard month on the chiller front.");
    expect(p1).toContain("Temporary power & fuel agreed");
    expect(p1).not.toContain("<strong>");
    expect(draftPages[pageOf(draftPages, "3. Budget") - 1]).toContain("A second paragraph.");
    expect(issuedPages.join("")).not.toContain("Commentary from the project lead");
  });

  it("draws the charts as vector paths, and embeds only the photographs as images", async () => {
    const schedule = await operators(draft, pageOf(draftPages, "2. Schedule"));
    expect(schedule.filter((op) => op === OPS.constructPath).length).toBeGreaterThan(20);
    expect(schedule).not.toContain(OPS.paintImageXObject);
    const photoPage = await operators(draft, pageOf(draftPages, "7. Photographs of the month"));
    expect(photoPage.filter((op) => op === OPS.paintImageXObject)).toHaveLength(2);
    expect(draftPages[pageOf(draftPages, "7. Photographs of the month") - 1]).toContain("Chiller 3 lifted onto the roof deck (3 Oct 2026)");
  });

  it("says so where a section has nothing to show, instead of an empty chart", async () => {
    const empty = { ...figures, decisions: [], photos: [], schedule: { ...figures.schedule, trend: [], drivers: [] } };
    const text = (await pageTexts(await renderReportPdf(empty, {}, { state: "draft" }))).join("\n");
    expect(text).toContain("No decision is waiting on investors or the lender.");
    expect(text).toContain("No photograph was cleared for this audience in the month.");
    expect(text).toContain("No milestone had a forecast in these months.");
    expect(text).toContain("No block is late, so no chain sets a late date.");
  });
});

describe("commentaryBlocks", () => {
  it.each([
    ["<p>One <strong>bold</strong> and <em>slanted</em></p>", [{ kind: "paragraph", runs: [{ text: "One ", bold: false, italic: false }, { text: "bold", bold: true, italic: false }, { text: " and ", bold: false, italic: false }, { text: "slanted", bold: false, italic: true }] }]],
    ["<ol><li>first</li><li>second</li></ol>", [{ kind: "item", bullet: "1.", runs: [{ text: "first", bold: false, italic: false }] }, { kind: "item", bullet: "2.", runs: [{ text: "second", bold: false, italic: false }] }]],
    ["<h2>Plan</h2><figure><img src=x alt=y><figcaption>left out</figcaption></figure><blockquote><p>said &lt;so&gt;</p></blockquote>", [{ kind: "heading", runs: [{ text: "Plan", bold: false, italic: false }] }, { kind: "quote", runs: [{ text: "said <so>", bold: false, italic: false }] }]],
    ["first paragraph\n\nsecond", [{ kind: "paragraph", runs: [{ text: "first paragraph", bold: false, italic: false }] }, { kind: "paragraph", runs: [{ text: "second", bold: false, italic: false }] }]],
  ])("%s", (html, blocks) => {
    expect(commentaryBlocks(html)).toEqual(blocks);
  });
});
