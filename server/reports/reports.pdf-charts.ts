import { formatAxisMonth } from "#shared/domain/locale-dates.ts";
import type { ReportBudget, ReportFacility, ReportRisks, ReportSchedule } from "#shared/domain/report-figures.ts";

/**
 * The report's charts, drawn as vector paths from the same figures as the web page (never a
 * picture of a page). Each chart says what it shows in words as well as by colour: labels beside
 * bars, a marker shape per line, band words in the grid.
 */

type Doc = PDFKit.PDFDocument;
export interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

export const INK = "#1d2a33";
export const MUTED = "#5b6770";
const RULE = "#cfd6db";
const FORECAST = "#0f5f73";
const BASELINE = "#8a96a0";
const LATE = "#a8452a";
const EARLY = "#3b7a45";
const SERIES = ["#0f5f73", "#a8452a", "#6b4fa0", "#3b7a45", "#9a7a12", "#33475b"];

const DAY = 86_400_000;
const dayNumber = (d: string) => Date.UTC(Number(d.slice(0, 4)), Number(d.slice(5, 7)) - 1, Number(d.slice(8, 10))) / DAY;
const monthLabel = (d: string) => formatAxisMonth(d.slice(0, 10));

function small(doc: Doc, size = 7, colour = MUTED): Doc {
  return doc.font("text").fontSize(size).fillColor(colour);
}

/** A marker of its own shape per series, so lines are told apart without colour. */
export function drawMarker(doc: Doc, shape: number, x: number, y: number, r: number, colour: string, filled = true): void {
  doc.save().lineWidth(0.8);
  switch (shape % 4) {
    case 0:
      doc.circle(x, y, r);
      break;
    case 1:
      doc.rect(x - r, y - r, 2 * r, 2 * r);
      break;
    case 2:
      doc.polygon([x, y - r * 1.2], [x + r * 1.1, y + r * 0.8], [x - r * 1.1, y + r * 0.8]);
      break;
    default:
      doc.polygon([x, y - r * 1.3], [x + r * 1.3, y], [x, y + r * 1.3], [x - r * 1.3, y]);
  }
  if (filled) doc.fillAndStroke(colour, colour);
  else doc.stroke(colour);
  doc.restore();
}

/** Percent complete against plan: two bars on one 0–100 scale. */
export function drawProgressBars(doc: Doc, box: Box, done: number, planned: number): void {
  const labelW = 70;
  const barW = box.w - labelW - 40;
  const rows: Array<[string, number, string]> = [
    ["Planned", planned, BASELINE],
    ["Complete", done, FORECAST],
  ];
  rows.forEach(([label, value, colour], i) => {
    const y = box.y + i * 18;
    small(doc, 8, INK).text(label, box.x, y + 2, { width: labelW, lineBreak: false });
    doc.rect(box.x + labelW, y, barW, 11).lineWidth(0.5).stroke(RULE);
    doc.rect(box.x + labelW, y, (barW * Math.max(0, Math.min(100, value))) / 100, 11).fill(colour);
    small(doc, 8, INK).text(`${value.toFixed(1)} %`, box.x + labelW + barW + 4, y + 2, { width: 40, lineBreak: false });
  });
}

/** The slip chart: one bar per milestone from the baseline, right for late, left for early. */
export function drawSlipChart(doc: Doc, box: Box, slips: ReportSchedule["slips"]): number {
  const rows = slips.slice(0, 14);
  const labelW = box.w * 0.36;
  const valueW = 92;
  const plotW = box.w - labelW - valueW;
  const max = Math.max(5, ...rows.map((s) => Math.abs(s.slipWorkingDays)));
  const zero = box.x + labelW + (plotW * max) / (2 * max);
  const rowH = 13;
  rows.forEach((s, i) => {
    const y = box.y + i * rowH;
    small(doc, 7, INK).text(s.name, box.x, y + 2, { width: labelW - 6, height: rowH, lineBreak: false, ellipsis: true });
    const len = (plotW / 2) * (Math.abs(s.slipWorkingDays) / max);
    const late = s.slipWorkingDays > 0;
    if (s.slipWorkingDays !== 0) doc.rect(late ? zero : zero - len, y + 2, len, rowH - 5).fill(late ? LATE : EARLY);
    const words = s.slipWorkingDays === 0 ? "on baseline" : `${Math.abs(s.slipWorkingDays)} wd ${late ? "late" : "early"}`;
    small(doc, 7, INK).text(words, box.x + labelW + plotW + 4, y + 2, { width: valueW - 4, lineBreak: false });
  });
  const bottom = box.y + rows.length * rowH;
  doc.moveTo(zero, box.y - 2).lineTo(zero, bottom).lineWidth(0.8).stroke(INK);
  small(doc, 6.5).text("early", zero - 40, bottom + 2, { width: 36, align: "right", lineBreak: false });
  small(doc, 6.5).text("late", zero + 4, bottom + 2, { width: 40, lineBreak: false });
  small(doc, 6.5).text("baseline", zero - 20, bottom + 10, { width: 40, align: "center", lineBreak: false });
  return bottom + 20;
}

/**
 * The milestone trend chart: across, the month ends at which the forecast was read; up, the
 * forecast date itself. A level line holds its date; a rising one is drifting later.
 */
export function drawTrendChart(doc: Doc, box: Box, trend: ReportSchedule["trend"]): number {
  const series = trend.slice(0, SERIES.length);
  const ends = series[0]?.points.map((p) => p.monthEnd) ?? [];
  const dates = series.flatMap((s) => [...s.points.map((p) => p.forecast), s.baseline]).filter((d): d is string => d !== null).map(dayNumber);
  const legendH = 12 * Math.ceil(series.length / 2) + 6;
  const plot = { x: box.x + 52, y: box.y, w: box.w - 60, h: box.h - 22 - legendH };
  if (ends.length === 0 || dates.length === 0) {
    small(doc, 8).text("No milestone had a forecast in these months.", box.x, box.y);
    return box.y + 14;
  }
  const lo = Math.min(...dates) - 10;
  const hi = Math.max(...dates) + 10;
  const xAt = (i: number) => plot.x + (ends.length === 1 ? plot.w / 2 : (plot.w * i) / (ends.length - 1));
  const yAt = (d: number) => plot.y + plot.h - (plot.h * (d - lo)) / (hi - lo);
  doc.rect(plot.x, plot.y, plot.w, plot.h).lineWidth(0.5).stroke(RULE);
  // Month gridlines up the side: the forecast dates' scale.
  const first = new Date((lo + 1) * DAY);
  for (let m = new Date(Date.UTC(first.getUTCFullYear(), first.getUTCMonth() + 1, 1)); m.getTime() / DAY <= hi; m = new Date(Date.UTC(m.getUTCFullYear(), m.getUTCMonth() + 1, 1))) {
    const y = yAt(m.getTime() / DAY);
    doc.moveTo(plot.x, y).lineTo(plot.x + plot.w, y).lineWidth(0.3).stroke(RULE);
    small(doc, 6.5).text(monthLabel(m.toISOString()), box.x, y - 3, { width: 48, align: "right", lineBreak: false });
  }
  ends.forEach((e, i) => small(doc, 6.5).text(monthLabel(e), xAt(i) - 20, plot.y + plot.h + 4, { width: 40, align: "center", lineBreak: false }));
  small(doc, 6.5).text("Forecast read at month end", plot.x, plot.y + plot.h + 13, { width: plot.w, align: "center", lineBreak: false });
  series.forEach((s, k) => {
    const colour = SERIES[k]!;
    if (s.baseline) {
      const y = yAt(dayNumber(s.baseline));
      doc.moveTo(plot.x, y).lineTo(plot.x + plot.w, y).dash(2, { space: 2 }).lineWidth(0.6).stroke(colour).undash();
    }
    const pts = s.points.map((p, i) => (p.forecast ? ([xAt(i), yAt(dayNumber(p.forecast))] as const) : null));
    let started = false;
    for (const p of pts) {
      if (!p) continue;
      if (started) doc.lineTo(p[0], p[1]);
      else doc.moveTo(p[0], p[1]);
      started = true;
    }
    if (started) doc.lineWidth(1.2).stroke(colour);
    for (const p of pts) if (p) drawMarker(doc, k, p[0], p[1], 2.4, colour);
  });
  const legendY = plot.y + plot.h + 26;
  series.forEach((s, k) => {
    const lx = box.x + (k % 2) * (box.w / 2);
    const ly = legendY + Math.floor(k / 2) * 12;
    drawMarker(doc, k, lx + 4, ly + 4, 2.6, SERIES[k]!);
    small(doc, 7, INK).text(`${s.milestone} (dashed: baseline)`, lx + 12, ly, { width: box.w / 2 - 16, lineBreak: false, ellipsis: true });
  });
  return legendY + legendH;
}

/** The capacity ramp: IT load available over time, baseline (dashed) against forecast (solid) steps. */
export function drawRampChart(doc: Doc, box: Box, ramp: ReportFacility["ramp"]): number {
  if (ramp.length === 0) {
    small(doc, 8).text("No capacity block has a ready-for-service date yet.", box.x, box.y);
    return box.y + 14;
  }
  const plot = { x: box.x + 44, y: box.y, w: box.w - 52, h: box.h - 40 };
  const days = ramp.map((r) => dayNumber(r.date));
  const lo = Math.min(...days) - 30;
  const hi = Math.max(...days) + 30;
  const top = Math.max(1, ...ramp.flatMap((r) => [r.kwBaseline, r.kwForecast])) * 1.1;
  const xAt = (d: number) => plot.x + (plot.w * (d - lo)) / (hi - lo);
  const yAt = (kw: number) => plot.y + plot.h - (plot.h * kw) / top;
  doc.rect(plot.x, plot.y, plot.w, plot.h).lineWidth(0.5).stroke(RULE);
  for (let i = 0; i <= 4; i += 1) {
    const kw = (top / 4) * i;
    doc.moveTo(plot.x, yAt(kw)).lineTo(plot.x + plot.w, yAt(kw)).lineWidth(0.3).stroke(RULE);
    small(doc, 6.5).text(`${Math.round(kw).toLocaleString("en-GB")} kW`, box.x, yAt(kw) - 3, { width: 40, align: "right", lineBreak: false });
  }
  ramp.forEach((r, i) => {
    if (i % Math.ceil(ramp.length / 6) === 0) small(doc, 6.5).text(monthLabel(r.date), xAt(days[i]!) - 20, plot.y + plot.h + 4, { width: 40, align: "center", lineBreak: false });
  });
  const step = (value: (r: (typeof ramp)[number]) => number, colour: string, dashed: boolean) => {
    doc.moveTo(plot.x, yAt(0));
    let last = 0;
    ramp.forEach((r, i) => {
      doc.lineTo(xAt(days[i]!), yAt(last)).lineTo(xAt(days[i]!), yAt(value(r)));
      last = value(r);
    });
    doc.lineTo(plot.x + plot.w, yAt(last));
    if (dashed) doc.dash(3, { space: 2 });
    doc.lineWidth(dashed ? 1 : 1.6).stroke(colour).undash();
  };
  // Baseline and forecast steps come in date order of their own; the ramp lists both at each date.
  step((r) => r.kwBaseline, BASELINE, true);
  step((r) => r.kwForecast, FORECAST, false);
  const ly = plot.y + plot.h + 18;
  doc.moveTo(box.x, ly + 4).lineTo(box.x + 20, ly + 4).dash(3, { space: 2 }).lineWidth(1).stroke(BASELINE).undash();
  small(doc, 7, INK).text("Baseline (dashed)", box.x + 24, ly, { lineBreak: false });
  doc.moveTo(box.x + 130, ly + 4).lineTo(box.x + 150, ly + 4).lineWidth(1.6).stroke(FORECAST);
  small(doc, 7, INK).text("Forecast (solid)", box.x + 154, ly, { lineBreak: false });
  return ly + 14;
}

/** The budget walk: original budget, each approved change floating from the running total, current budget, projected final cost. */
export function drawBudgetWalk(doc: Doc, box: Box, walk: ReportBudget["walk"], money: (minor: number) => string): number {
  const bars = walk.slice(0, 10);
  const plot = { x: box.x + 50, y: box.y + 10, w: box.w - 56, h: box.h - 50 };
  let running = 0;
  const spans = bars.map((b) => {
    if (b.kind === "change") {
      const from = running;
      running += b.amount;
      return { b, from, to: running };
    }
    running = b.amount;
    return { b, from: 0, to: b.amount };
  });
  const values = spans.flatMap((s) => [s.from, s.to]);
  const hiV = Math.max(1, ...values);
  // Start the scale near the smallest total so changes of a few percent are still visible.
  const totals = spans.filter((s) => s.b.kind !== "change").map((s) => s.to);
  const loV = Math.max(0, Math.min(...totals, ...values.filter((v) => v > 0)) * 0.85);
  const yAt = (v: number) => plot.y + plot.h - (plot.h * (v - loV)) / (hiV * 1.04 - loV);
  doc.moveTo(plot.x, plot.y + plot.h).lineTo(plot.x + plot.w, plot.y + plot.h).lineWidth(0.5).stroke(RULE);
  small(doc, 6.5).text(money(loV), box.x, plot.y + plot.h - 3, { width: 46, align: "right", lineBreak: false });
  small(doc, 6.5).text("scale starts here", box.x, plot.y + plot.h + 5, { width: 46, align: "right", lineBreak: false });
  const slot = plot.w / Math.max(1, spans.length);
  spans.forEach((s, i) => {
    const x = plot.x + i * slot + slot * 0.15;
    const w = slot * 0.7;
    const top = yAt(Math.max(s.from, s.to));
    const bottom = s.b.kind === "change" ? yAt(Math.min(s.from, s.to)) : plot.y + plot.h;
    const colour = s.b.kind === "change" ? (s.b.amount >= 0 ? LATE : EARLY) : s.b.kind === "projection" ? FORECAST : BASELINE;
    if (s.b.kind === "projection") doc.rect(x, top, w, Math.max(1, bottom - top)).lineWidth(1.2).dash(2, { space: 1.5 }).stroke(colour).undash();
    else doc.rect(x, top, w, Math.max(1, bottom - top)).fill(colour);
    const sign = s.b.kind === "change" ? (s.b.amount >= 0 ? "+" : "−") : "";
    small(doc, 6.5, INK).text(`${sign}${money(Math.abs(s.b.amount))}`, x - 6, top - 9, { width: w + 12, align: "center", lineBreak: false });
    small(doc, 6.5, INK).text(s.b.label, x - 4, plot.y + plot.h + 4, { width: w + 8, height: 26, align: "center", ellipsis: true });
  });
  return plot.y + plot.h + 34;
}

const BAND_FILL: Record<string, string> = { low: "#e6efe8", medium: "#f4ead0", high: "#f1d6c9", critical: "#dfb3a6" };
const BAND_WORD: Record<string, string> = { low: "Low", medium: "Med", high: "High", critical: "Crit" };

/** Likelihood × impact grid of open risks at the month end: each cell gives its count and its band in words. */
export function drawRiskGrid(doc: Doc, box: Box, risks: Pick<ReportRisks, "grid" | "scale">): number {
  const { likelihoodLevels: L, impactLevels: I } = risks.scale;
  const cell = Math.min((box.w - 40) / I, (box.h - 30) / L);
  const x0 = box.x + 40;
  for (let l = L; l >= 1; l -= 1) {
    const y = box.y + (L - l) * cell;
    small(doc, 7, INK).text(String(l), x0 - 12, y + cell / 2 - 3, { width: 10, align: "right", lineBreak: false });
    for (let i = 1; i <= I; i += 1) {
      const x = x0 + (i - 1) * cell;
      const c = risks.grid.find((g) => g.likelihood === l && g.impact === i);
      const band = c?.band ?? "low";
      doc.rect(x, y, cell, cell).fillAndStroke(BAND_FILL[band]!, "#ffffff");
      small(doc, 6, MUTED).text(BAND_WORD[band]!, x + 2, y + 2, { width: cell - 4, lineBreak: false });
      if (c && c.count > 0) doc.font("heading").fontSize(11).fillColor(INK).text(String(c.count), x, y + cell / 2 - 5, { width: cell, align: "center", lineBreak: false });
    }
  }
  const bottom = box.y + L * cell;
  for (let i = 1; i <= I; i += 1) small(doc, 7, INK).text(String(i), x0 + (i - 1) * cell, bottom + 3, { width: cell, align: "center", lineBreak: false });
  small(doc, 7).text(`Impact, 1 (least) to ${I} (most)`, x0, bottom + 13, { width: cell * I, align: "center", lineBreak: false });
  doc.save().rotate(-90, { origin: [box.x + 8, box.y + (L * cell) / 2 + 34] });
  small(doc, 7).text(`Likelihood, 1 to ${L}`, box.x + 8, box.y + (L * cell) / 2 + 34, { width: 90, lineBreak: false });
  doc.restore();
  return bottom + 26;
}
