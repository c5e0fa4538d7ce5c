import PDFDocument from "pdfkit";
import { formatMonthYear, formatShortDate } from "#shared/domain/locale-dates.ts";
import type { ReportFigures, ReportImageLoader, ReportMilestoneRow } from "#shared/domain/report-figures.ts";
import { REPORT_SECTIONS, type ReportSection } from "#shared/schemas/reports.ts";
import { INK, MUTED, drawBudgetWalk, drawMarker, drawProgressBars, drawRampChart, drawRiskGrid, drawSlipChart, drawTrendChart, type Box } from "./reports.pdf-charts.ts";
import { reportFonts } from "./reports.pdf-fonts.ts";
import { commentaryBlocks, type CommentaryBlock } from "./reports.pdf-html.ts";

/**
 * The monthly report as a PDF, drawn with pdfkit from the report's figures (the same object the
 * investor room's page is drawn from): A4 portrait, Inter and Source Serif 4 embedded, charts as
 * vector paths, a tagged structure (sections, headings, paragraphs, tables, figures with alt
 * text) in reading order, and a running header and page numbers marked as pagination artifacts.
 * Per-reader stamping is not done here: the issued PDF is a library document and the documents
 * module stamps each investor's copy.
 */

export const SECTION_TITLES: Record<ReportSection, string> = {
  summary: "1. Summary",
  schedule: "2. Schedule",
  budget: "3. Budget",
  facility: "4. Facility",
  risks: "5. Risks and issues",
  decisions: "6. Decisions needed",
  photos: "7. Photographs of the month",
  cautions: "8. Cautions",
};
export const APPENDIX_TITLE = "Appendix: milestone table";

export interface ReportPdfOptions {
  state: "draft" | "issued";
  issuedAt?: string;
  /** Reads a photo's JPEG by its storage key; without it photos are listed by caption only. */
  loadImage?: ReportImageLoader;
}

const A4 = { w: 595.28, h: 841.89 };
const MARGIN = { top: 64, bottom: 60, left: 54, right: 54 };
const WIDTH = A4.w - MARGIN.left - MARGIN.right;

type Doc = PDFKit.PDFDocument;
type Struct = PDFKit.PDFStructureElement;


const day = (d: string | null | undefined) => (d ? formatShortDate(d.slice(0, 10)) : "not set");
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

export async function renderReportPdf(figures: ReportFigures, commentary: Partial<Record<ReportSection, string>>, opts: ReportPdfOptions): Promise<Buffer> {
  const title = `${figures.project.name}: monthly report, ${formatMonthYear(figures.month)}`;
  const doc = new PDFDocument({
    size: "A4",
    layout: "portrait",
    margins: MARGIN,
    bufferPages: true,
    autoFirstPage: true,
    pdfVersion: "1.7",
    tagged: true,
    lang: "en-GB",
    displayTitle: true,
    info: {
      Title: title,
      Author: figures.project.operatorName,
      Subject: `Progress of ${figures.project.name} as at ${day(figures.monthEnd)} (${opts.state})`,
      Keywords: "monthly report, data centre construction",
      Creator: "Plumbline",
      // A frozen issue renders the same bytes' meaning every time: dated by its issue, not by the print.
      CreationDate: new Date(opts.issuedAt ?? figures.computedAt),
    },
  });
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const ended = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });

  // pdfkit opens a parsed fontkit font as it opens a file (its types name only files and buffers).
  for (const [name, font] of Object.entries(reportFonts())) doc.registerFont(name, font as unknown as Buffer);
  const images = await loadPhotos(figures, opts.loadImage);

  const money = (minor: number | null) => formatReportMoney(minor, figures.project.currency);
  const w = new Writer(doc);

  const sections: Record<ReportSection, (s: Struct) => void> = {
    summary: (s) => summary(w, s, figures, money, title, opts),
    schedule: (s) => schedule(w, s, figures),
    budget: (s) => budget(w, s, figures, money),
    facility: (s) => facility(w, s, figures),
    risks: (s) => risks(w, s, figures),
    decisions: (s) => decisions(w, s, figures),
    photos: (s) => photos(w, s, figures, images),
    cautions: (s) => cautions(w, s, figures),
  };
  for (const key of REPORT_SECTIONS) {
    const sect = doc.struct("Sect", { title: SECTION_TITLES[key] });
    doc.addStructure(sect);
    if (key !== "summary") w.newPage();
    w.heading(sect, SECTION_TITLES[key], 1);
    sections[key](sect);
    const note = commentary[key];
    if (note && note.trim()) w.commentary(sect, commentaryBlocks(note));
    sect.end();
  }
  const appendix = doc.struct("Sect", { title: APPENDIX_TITLE });
  doc.addStructure(appendix);
  w.newPage();
  w.heading(appendix, APPENDIX_TITLE, 1);
  milestoneTable(w, appendix, figures.milestones);
  appendix.end();

  runningHeads(doc, figures, opts);
  doc.end();
  return ended;
}

/** Money in minor units, compact for the report's figures: "£48.2m", "£850k", "£1,200". */
export function formatReportMoney(minor: number | null, currency: string): string {
  if (minor === null || !Number.isFinite(minor)) return "not known";
  const major = minor / 100;
  const big = Math.abs(major) >= 100_000;
  const key = `${currency}:${big}`;
  let format = moneyFormats.get(key);
  if (format === undefined) {
    try {
      format = new Intl.NumberFormat("en-GB", { style: "currency", currency, notation: big ? "compact" : "standard", maximumFractionDigits: big ? 1 : 0 });
    } catch {
      // Not a currency Intl knows: the amount and the code.
      format = null;
    }
    moneyFormats.set(key, format);
  }
  return format ? format.format(major) : `${Math.round(major).toLocaleString("en-GB")} ${currency}`;
}
/** Making a number format costs more than a page of text; a report formats a hundred amounts. */
const moneyFormats = new Map<string, Intl.NumberFormat | null>();

async function loadPhotos(figures: ReportFigures, load: ReportImageLoader | undefined): Promise<Map<string, Buffer>> {
  const out = new Map<string, Buffer>();
  if (!load) return out;
  for (const p of figures.photos) {
    const bytes = await load(p.imagePath);
    if (bytes) out.set(p.imagePath, Buffer.from(bytes));
  }
  return out;
}

/** Writes tagged blocks top to bottom, starting a page when the next block does not fit. */
class Writer {
  constructor(readonly doc: Doc) {}

  get bottom(): number {
    return A4.h - MARGIN.bottom;
  }

  newPage(): void {
    this.doc.addPage();
  }

  /** Starts a page unless `height` points still fit below the cursor. */
  room(height: number): void {
    if (this.doc.y + height > this.bottom) this.newPage();
  }

  heading(parent: Struct, text: string, level: 1 | 2): void {
    const doc = this.doc;
    this.room(level === 1 ? 60 : 40);
    if (level === 2) doc.moveDown(0.6);
    parent.add(doc.struct(level === 1 ? "H1" : "H2", {}, () => {
      doc.font("heading").fontSize(level === 1 ? 17 : 11.5).fillColor(INK).text(text, MARGIN.left, doc.y, { width: WIDTH });
    }));
    doc.moveDown(level === 1 ? 0.5 : 0.3);
  }

  para(parent: Struct, text: string, opts: { size?: number; colour?: string; font?: string } = {}): void {
    const doc = this.doc;
    parent.add(doc.struct("P", {}, () => {
      doc.font(opts.font ?? "text").fontSize(opts.size ?? 9.5).fillColor(opts.colour ?? INK).text(text, MARGIN.left, doc.y, { width: WIDTH, lineGap: 1.5 });
    }));
    doc.moveDown(0.35);
  }

  list(parent: Struct, items: string[], empty: string): void {
    if (items.length === 0) return this.para(parent, empty, { colour: MUTED });
    const doc = this.doc;
    const list = doc.struct("L");
    parent.add(list);
    for (const item of items) {
      this.room(14);
      list.add(doc.struct("LI", {}, () => {
        doc.font("text").fontSize(9.5).fillColor(INK).text(`•  ${item}`, MARGIN.left + 6, doc.y, { width: WIDTH - 6, lineGap: 1.5, indent: 0 });
      }));
    }
    list.end();
    doc.moveDown(0.35);
  }

  /** A chart: vector paths in a Figure element whose alt text says what it shows. */
  figure(parent: Struct, height: number, alt: string, draw: (box: Box) => number): void {
    const doc = this.doc;
    this.room(height);
    const box = { x: MARGIN.left, y: doc.y + 8, w: WIDTH, h: height };
    let end = box.y + height;
    parent.add(doc.struct("Figure", { alt }, () => {
      end = draw(box);
    }));
    doc.x = MARGIN.left;
    doc.y = Math.max(end, box.y) + 8;
  }

  /** A table with a header row; rows that do not fit go on to the next page under a repeated header. */
  table(parent: Struct, columns: Array<{ title: string; width: number }>, rows: string[][], marker?: (row: number) => number | null): void {
    const doc = this.doc;
    const table = doc.struct("Table");
    parent.add(table);
    const total = columns.reduce((a, c) => a + c.width, 0);
    const widths = columns.map((c) => (c.width / total) * WIDTH);
    const drawRow = (cells: string[], header: boolean, index: number) => {
      doc.font(header ? "strong" : "text").fontSize(8);
      const shape = !header && marker ? marker(index) : null;
      const pads = cells.map((_, i) => (i === 0 && shape !== null ? 14 : 4));
      const h = Math.max(...cells.map((c, i) => doc.heightOfString(c, { width: widths[i]! - pads[i]! - 4 }))) + 6;
      if (doc.y + h > this.bottom) {
        this.newPage();
        if (!header) drawRow(columns.map((c) => c.title), true, -1);
      }
      const y = doc.y;
      if (header) doc.rect(MARGIN.left, y, WIDTH, h).fill("#eef1f3");
      const tr = doc.struct("TR");
      table.add(tr);
      let x = MARGIN.left;
      cells.forEach((cell, i) => {
        const pad = pads[i]!;
        tr.add(doc.struct(header ? "TH" : "TD", {}, () => {
          doc.font(header ? "strong" : "text").fontSize(8).fillColor(INK).text(cell, x + pad, y + 3, { width: widths[i]! - pad - 4 });
        }));
        if (i === 0 && shape !== null) drawMarker(doc, shape, x + 7, y + 7, 2.6, INK);
        x += widths[i]!;
      });
      tr.end();
      doc.moveTo(MARGIN.left, y + h).lineTo(MARGIN.left + WIDTH, y + h).lineWidth(0.4).stroke("#cfd6db");
      doc.x = MARGIN.left;
      doc.y = y + h;
    };
    drawRow(columns.map((c) => c.title), true, -1);
    rows.forEach((r, i) => drawRow(r, false, i));
    table.end();
    doc.moveDown(0.6);
  }

  /** The lead's commentary, set in the serif so it reads as a voice beside the figures. */
  commentary(parent: Struct, blocks: CommentaryBlock[]): void {
    const doc = this.doc;
    if (blocks.length === 0) return;
    this.heading(parent, "Commentary from the project lead", 2);
    for (const block of blocks) {
      this.room(20);
      const indent = block.kind === "item" ? 12 : block.kind === "quote" ? 18 : 0;
      const tag = block.kind === "heading" ? "H3" : block.kind === "item" ? "LI" : block.kind === "quote" ? "BlockQuote" : "P";
      parent.add(doc.struct(tag, {}, () => {
        doc.fontSize(block.kind === "heading" ? 11 : 10).fillColor(INK);
        doc.x = MARGIN.left + indent;
        const runs = block.kind === "item" ? [{ text: `${block.bullet}  `, bold: false, italic: false }, ...block.runs] : block.runs;
        runs.forEach((run, i) => {
          const font = run.bold || block.kind === "heading" ? "serifBold" : run.italic ? "serifItalic" : "serif";
          doc.font(font).text(run.text, { width: WIDTH - indent, lineGap: 2, continued: i < runs.length - 1 });
        });
      }));
      doc.x = MARGIN.left;
      doc.moveDown(block.kind === "item" ? 0.1 : 0.4);
    }
  }
}

function summary(w: Writer, s: Struct, f: ReportFigures, money: (m: number | null) => string, title: string, opts: ReportPdfOptions): void {
  const sum = f.summary;
  w.para(s, title, { font: "strong", size: 11 });
  const when = opts.state === "issued" && opts.issuedAt ? `Issued ${day(opts.issuedAt)}.` : "Draft: not issued; figures may still change.";
  w.para(s, `Figures as the record stood at the end of ${day(f.monthEnd)} (${f.project.timeZone}). ${when}`, { size: 8.5, colour: MUTED });
  for (const line of sum.headline) w.para(s, line, { size: 10.5 });

  w.heading(s, "Progress against plan", 2);
  const gap = sum.percentComplete - sum.plannedPercent;
  w.para(s, `${sum.percentComplete.toFixed(1)} % complete against ${sum.plannedPercent.toFixed(1)} % planned by the month end (${gap >= 0 ? `${gap.toFixed(1)} points ahead` : `${Math.abs(gap).toFixed(1)} points behind`}).`);
  w.figure(s, 40, `Bars: ${sum.percentComplete.toFixed(1)} % complete against ${sum.plannedPercent.toFixed(1)} % planned.`, (box) => {
    drawProgressBars(w.doc, box, sum.percentComplete, sum.plannedPercent);
    return box.y + 36;
  });
  w.para(s, sum.spiSentence);
  w.para(s, sum.spiTSentence);

  w.heading(s, "Ready for service, block by block", 2);
  w.list(s, sum.blocks.map(blockLine), "No capacity block is in the record yet.");

  w.heading(s, "Budget position", 2);
  w.para(s, `Current budget ${money(sum.budget.currentBudget)}; projected final cost ${money(sum.budget.projectedFinalCost)}; contingency remaining ${money(sum.budget.contingencyRemaining)}. ${sum.budget.sentence}`);

  w.heading(s, "Top three risks", 2);
  w.list(s, sum.topRisks.map((r) => `${r.reference} ${r.title}: ${r.band}, score ${r.score}, ${trendWord(r.trend)}.`), "No open risks or issues at the month end.");

  w.heading(s, "Open decisions", 2);
  w.list(s, sum.openDecisions.map((d) => `${d.reference} ${d.title}: needed by ${day(d.neededBy)} (${daysLeftWords(d.daysLeft)}).`), "No decision is waiting.");
}

function blockLine(b: ReportFigures["summary"]["blocks"][number]): string {
  if (b.readyForService) return `${b.name}: ready for service (baseline ${day(b.baselineReadyDate)}).`;
  const slip = b.slipWorkingDays === null ? "" : b.slipWorkingDays > 0 ? `, ${plural(b.slipWorkingDays, "working day")} late` : b.slipWorkingDays < 0 ? `, ${plural(-b.slipWorkingDays, "working day")} early` : ", on its baseline";
  return `${b.name}: forecast ready ${day(b.forecastReadyDate)} against baseline ${day(b.baselineReadyDate)}${slip}.`;
}

function trendWord(t: string): string {
  return t === "new" ? "new this month" : t === "rising" ? "rising" : t === "falling" ? "falling" : "steady";
}

function daysLeftWords(n: number): string {
  return n < 0 ? `${plural(-n, "day")} overdue` : n === 0 ? "due at the month end" : `${plural(n, "day")} left`;
}

function schedule(w: Writer, s: Struct, f: ReportFigures): void {
  const sc = f.schedule;
  w.heading(s, "Completed in the month", 2);
  w.list(s, sc.completedInMonth.map((m) => `${m.name}: finished ${day(m.actualFinish)} (baseline ${day(m.baselineFinish)}).`), "No milestone was completed in the month.");
  w.heading(s, "Due next month", 2);
  w.list(s, sc.dueNextMonth.map((m) => `${m.name}: forecast ${day(m.forecastFinish)} (baseline ${day(m.baselineFinish)}).`), "No milestone is due next month.");
  w.heading(s, "Slip against baseline", 2);
  const late = sc.slips.filter((x) => x.slipWorkingDays > 0).length;
  w.figure(s, Math.min(14, sc.slips.length) * 13 + 26, `Slip chart: ${plural(sc.slips.length, "milestone")}, ${late} late; bars right of the baseline line are late, left early.`, (box) => drawSlipChart(w.doc, box, sc.slips));
  w.heading(s, "What drives the variance", 2);
  w.list(s, sc.drivers.map((d) => `${d.block}: ${d.chain.join(" › ")}`), "No block is late, so no chain sets a late date.");
  w.heading(s, "Milestone trend", 2);
  w.para(s, "Each line is one key milestone's forecast date as it stood at each past month end: a level line holds its date, a rising one is drifting later.", { size: 8.5, colour: MUTED });
  w.figure(s, 250, `Milestone trend chart for ${sc.trend.map((t) => t.milestone).join(", ")}.`, (box) => drawTrendChart(w.doc, box, sc.trend));
  const ieac = sc.ieacT === null ? "IEAC(t) is not yet defined." : `IEAC(t) ${sc.ieacT.toFixed(1)} weeks: at the pace so far the build would finish ${day(sc.ieacTCompletion)}, against a baseline of ${day(sc.baselineCompletion)} and a forecast of ${day(sc.forecastCompletion)}.`;
  w.para(s, ieac);
}

function budget(w: Writer, s: Struct, f: ReportFigures, money: (m: number | null) => string): void {
  const b = f.budget;
  w.para(s, `Original budget ${money(b.originalBudget)}, approved changes ${money(b.approvedChanges)}, current budget ${money(b.currentBudget)}, projected final cost ${money(b.projectedFinalCost)}.`);
  w.heading(s, "From original budget to projected final cost", 2);
  w.figure(s, 200, `Budget walk: ${b.walk.map((x) => `${x.label} ${money(x.amount)}`).join("; ")}.`, (box) => drawBudgetWalk(w.doc, box, b.walk, (m) => money(m)));
  w.heading(s, "Contingency", 2);
  w.para(s, `Held ${money(b.contingency.held)}, drawn ${money(b.contingency.drawn)}, remaining ${money(b.contingency.remaining)}.`);
  w.heading(s, "Estimates at completion", 2);
  w.table(s, [{ title: "Method", width: 2 }, { title: "Estimate", width: 1 }, { title: "What it assumes", width: 4 }], b.eac.map((e) => [`${e.formula}${e.method === b.projectedFinalCostMethod ? " (used)" : ""}`, money(e.value), e.sentence]));
  w.para(s, `CPI ${b.cpi === null ? "not defined" : b.cpi.toFixed(2)}, SPI ${b.spi === null ? "not defined" : b.spi.toFixed(2)}. ${b.caution}`, { size: 8.5, colour: MUTED });
}

function facility(w: Writer, s: Struct, f: ReportFigures): void {
  const fa = f.facility;
  w.heading(s, "Capacity ramp", 2);
  const last = fa.ramp.at(-1);
  w.figure(s, 190, last ? `Capacity ramp, baseline against forecast: ${Math.round(last.kwForecast)} kW forecast by ${day(last.date)}.` : "Capacity ramp: no dates yet.", (box) => drawRampChart(w.doc, box, fa.ramp));
  w.heading(s, "Blocks", 2);
  w.list(s, fa.blocks.map(blockLine), "No capacity block is in the record yet.");
  w.heading(s, "Redundancy per system", 2);
  w.table(s, [{ title: "System", width: 2 }, { title: "Design", width: 1 }, { title: "Now", width: 1 }, { title: "In plain words", width: 4 }], fa.systems.map((x) => [`${x.name}${x.carriesLoad ? "" : " (not yet carrying load)"}`, x.design, x.now, x.summary]));
  w.para(s, `A unit counts as available from commissioning level L${fa.availableFromLevel}.`, { size: 8.5, colour: MUTED });
}

function risks(w: Writer, s: Struct, f: ReportFigures): void {
  const r = f.risks;
  w.para(s, `${plural(r.openRisks, "open risk")} and ${plural(r.openIssues, "open issue")} at the month end.`);
  w.heading(s, "Top ten", 2);
  w.table(
    s,
    [{ title: "Ref", width: 1 }, { title: "Risk or issue", width: 3 }, { title: "Band, score", width: 1.4 }, { title: "Trend", width: 1.2 }, { title: "Owner and action", width: 3 }],
    r.top.map((x) => [x.reference, `${x.title} (${x.kind}, ${x.category})`, `${x.band}, ${x.score}`, trendWord(x.trend), `${x.owner}: ${x.action}`]),
  );
  w.heading(s, "Likelihood × impact", 2);
  const total = r.grid.reduce((a, c) => a + c.count, 0);
  w.figure(s, 200, `Likelihood by impact grid of ${plural(total, "open risk")}; each cell gives its count and its band.`, (box) => drawRiskGrid(w.doc, { ...box, w: 260 }, r));
}

function decisions(w: Writer, s: Struct, f: ReportFigures): void {
  if (f.decisions.length === 0) return w.para(s, "No decision is waiting on investors or the lender.", { colour: MUTED });
  for (const d of f.decisions) {
    w.heading(s, `${d.reference} ${d.title}`, 2);
    w.para(s, d.question);
    w.para(s, `Decided by ${d.decider}; needed by ${day(d.neededBy)} (${daysLeftWords(d.daysLeft)}).`, { size: 9, colour: MUTED });
    if (d.recommendation) w.para(s, `Recommendation: ${d.recommendation}`);
  }
}

function photos(w: Writer, s: Struct, f: ReportFigures, images: Map<string, Buffer>): void {
  if (f.photos.length === 0) return w.para(s, "No photograph was cleared for this audience in the month.", { colour: MUTED });
  const doc = w.doc;
  const colW = (WIDTH - 16) / 2;
  let col = 0;
  let rowTop = doc.y;
  let rowBottom = doc.y;
  for (const p of f.photos) {
    const h = Math.min(200, (colW * p.height) / Math.max(1, p.width));
    if (col === 0 && rowTop + h + 40 > w.bottom) {
      w.newPage();
      rowTop = doc.y;
    }
    const x = MARGIN.left + col * (colW + 16);
    const bytes = images.get(p.imagePath);
    s.add(doc.struct("Figure", { alt: p.alt }, () => {
      if (bytes) doc.image(bytes, x, rowTop, { fit: [colW, h], align: "center", valign: "center" });
      else doc.rect(x, rowTop, colW, h).lineWidth(0.5).stroke("#cfd6db");
    }));
    s.add(doc.struct("Caption", {}, () => {
      doc.font("text").fontSize(8).fillColor(INK).text(`${p.caption} (${day(p.takenOn)})`, x, rowTop + h + 4, { width: colW });
    }));
    rowBottom = Math.max(rowBottom, doc.y);
    col = (col + 1) % 2;
    if (col === 0) rowTop = rowBottom + 12;
  }
  doc.x = MARGIN.left;
  doc.y = (col === 0 ? rowTop : rowBottom + 12);
}

function cautions(w: Writer, s: Struct, f: ReportFigures): void {
  w.heading(s, "Indicative figures", 2);
  w.para(s, f.cautions.indicative);
  w.heading(s, "Site safety", 2);
  w.para(s, f.cautions.site);
}

const STATUS: Record<ReportMilestoneRow["status"], { word: string; shape: number }> = {
  complete: { word: "complete", shape: 0 },
  on_programme: { word: "on programme", shape: 1 },
  at_risk: { word: "at risk", shape: 2 },
  behind: { word: "behind", shape: 3 },
};

function milestoneTable(w: Writer, s: Struct, rows: ReportMilestoneRow[]): void {
  w.para(s, "Shapes beside each status: filled circle complete, square on programme, triangle at risk, diamond behind.", { size: 8.5, colour: MUTED });
  w.table(
    s,
    [{ title: "Status", width: 1.9 }, { title: "Milestone", width: 3.0 }, { title: "System", width: 1.75 }, { title: "Baseline", width: 1.4 }, { title: "Forecast", width: 1.4 }, { title: "Actual", width: 1.4 }, { title: "Slip (wd)", width: 0.9 }],
    rows.map((m) => [STATUS[m.status].word, m.name, m.system, day(m.baselineFinish), day(m.forecastFinish), m.actualFinish ? day(m.actualFinish) : "", String(m.slipWorkingDays)]),
    (i) => STATUS[rows[i]!.status].shape,
  );
}

/** The running header (project, month, draft or issued) and "Page n of N" on every page, as pagination artifacts. */
function runningHeads(doc: Doc, f: ReportFigures, opts: ReportPdfOptions): void {
  const range = doc.bufferedPageRange();
  const state = opts.state === "issued" ? `Issued${opts.issuedAt ? ` ${day(opts.issuedAt)}` : ""}` : "Draft, not issued";
  for (let i = range.start; i < range.start + range.count; i += 1) {
    doc.switchToPage(i);
    const margins = doc.page.margins;
    doc.page.margins = { ...margins, top: 0, bottom: 0 };
    doc.markContent("Artifact", { type: "Pagination" });
    doc.font("text").fontSize(8).fillColor(MUTED).text(`${f.project.name} · Monthly report ${formatMonthYear(f.month)}`, MARGIN.left, 30, { width: WIDTH - 130, lineBreak: false });
    doc.font("heading").fontSize(8).fillColor(opts.state === "issued" ? INK : "#a8452a").text(state, A4.w - MARGIN.right - 120, 30, { width: 120, align: "right", lineBreak: false });
    doc.moveTo(MARGIN.left, 44).lineTo(A4.w - MARGIN.right, 44).lineWidth(0.5).stroke("#cfd6db");
    doc.font("text").fontSize(8).fillColor(MUTED).text(`Page ${i - range.start + 1} of ${range.count}`, MARGIN.left, A4.h - 36, { width: WIDTH, align: "center", lineBreak: false });
    doc.endMarkedContent();
    doc.page.margins = margins;
  }
}
