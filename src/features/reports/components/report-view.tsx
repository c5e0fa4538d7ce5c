import { lazy, Suspense, type ReactNode } from "react";
import type { ReportFigures } from "#shared/domain/report-figures.ts";
import { REPORT_SECTIONS, type ReportSection } from "#shared/schemas/reports.ts";
import { Spinner } from "../../../components/ui/sheet.tsx";
import { formatDate, formatMoney } from "../../../lib/format.ts";
import { BAND_WORD, daysLeftWords, MILESTONE_STATUS_WORD, monthWords, percent, SECTION_TITLE, slipWords, TREND_WORD } from "../words.ts";
import { useReportParts } from "./report-parts.ts";

// recharts is large: the report's own charts load with the first section that draws one.
const SlipBars = lazy(() => import("./report-charts.tsx").then((m) => ({ default: m.SlipBars })));
const MilestoneTrend = lazy(() => import("./report-charts.tsx").then((m) => ({ default: m.MilestoneTrend })));

/** The commentary's typography: the serif of published pages. */
const COMMENTARY =
  "font-serif leading-[1.7] text-ink [&_a]:text-ink [&_a]:underline [&_blockquote]:border-l-4 [&_blockquote]:border-rule-strong [&_blockquote]:pl-4 [&_h2]:font-sans [&_h2]:text-xl [&_h2]:font-semibold [&_h3]:font-sans [&_h3]:font-semibold [&_img]:max-w-full [&_ol]:list-decimal [&_ol]:pl-6 [&_p]:my-2 [&_ul]:list-disc [&_ul]:pl-6";

function Facts({ rows }: { rows: ReadonlyArray<[string, ReactNode]> }) {
  return (
    <dl className="grid grid-cols-1 gap-x-6 gap-y-2 sm:grid-cols-2">
      {rows.map(([k, v]) => (
        <div key={k} className="flex items-baseline justify-between gap-3 border-b border-rule py-1">
          <dt className="text-sm text-ink-soft">{k}</dt>
          <dd className="tabular text-right font-medium">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

function Sub({ children }: { children: ReactNode }) {
  return <h3 className="mt-5 mb-2 font-semibold first:mt-0">{children}</h3>;
}

function Empty({ children }: { children: ReactNode }) {
  return <p className="text-sm text-ink-soft">{children}</p>;
}

const ChartLoading = () => <Spinner label="Drawing the chart" />;

function Blocks({ blocks }: { blocks: ReportFigures["summary"]["blocks"] }) {
  if (blocks.length === 0) return <Empty>No capacity block is on the record yet.</Empty>;
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Capacity blocks">
      <table className="w-full text-sm" data-testid="report-blocks">
        <caption className="sr-only">Ready-for-service date of each capacity block against its baseline</caption>
        <thead>
          <tr className="border-b border-rule text-left text-ink-soft">
            <th scope="col" className="py-1 pr-3 font-medium">Block</th>
            <th scope="col" className="py-1 pr-3 font-medium">Baseline</th>
            <th scope="col" className="py-1 pr-3 font-medium">Forecast</th>
            <th scope="col" className="py-1 font-medium">Against baseline</th>
          </tr>
        </thead>
        <tbody>
          {blocks.map((b) => (
            <tr key={b.name} className="border-b border-rule">
              <th scope="row" className="py-1 pr-3 text-left font-medium">{b.name}</th>
              <td className="tabular py-1 pr-3">{formatDate(b.baselineReadyDate)}</td>
              <td className="tabular py-1 pr-3">{b.readyForService ? `Ready ${formatDate(b.forecastReadyDate)}` : formatDate(b.forecastReadyDate)}</td>
              <td className="py-1">{slipWords(b.slipWorkingDays)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Summary({ f }: { f: ReportFigures }) {
  const s = f.summary;
  return (
    <div className="flex flex-col gap-4" data-testid="report-summary">
      <div className="flex flex-col gap-1" data-testid="report-headline">
        {s.headline.map((line) => (
          <p key={line} className="text-lg">{line}</p>
        ))}
      </div>
      <Facts
        rows={[
          ["Complete", <span key="c" data-testid="summary-percent">{percent(s.percentComplete)}</span>],
          ["Planned by the month end", <span key="p" data-testid="summary-planned">{percent(s.plannedPercent)}</span>],
          ["SPI", <span key="s" data-testid="summary-spi">{s.spi === null ? "—" : s.spi.toFixed(2)}</span>],
          ["SPI(t)", <span key="t" data-testid="summary-spit">{s.spiT === null ? "—" : s.spiT.toFixed(2)}</span>],
          ["Current budget", formatMoney(s.budget.currentBudget, f.project.currency)],
          ["Projected final cost", <span key="pfc" data-testid="summary-pfc">{formatMoney(s.budget.projectedFinalCost, f.project.currency)}</span>],
          ["Contingency remaining", formatMoney(s.budget.contingencyRemaining, f.project.currency)],
        ]}
      />
      <p className="text-sm">{s.spiSentence}</p>
      <p className="text-sm">{s.spiTSentence}</p>
      <p className="text-sm">{s.budget.sentence}</p>
      <Sub>Ready for service, block by block</Sub>
      <Blocks blocks={s.blocks} />
      <Sub>Top risks</Sub>
      {s.topRisks.length === 0 ? (
        <Empty>No open risk at the month end.</Empty>
      ) : (
        <ol className="flex flex-col gap-1 text-sm" data-testid="summary-risks">
          {s.topRisks.map((r) => (
            <li key={r.reference}>
              <span className="font-medium">{r.reference}</span> {r.title} — {BAND_WORD[r.band]} (score {r.score}), {TREND_WORD[r.trend].toLowerCase()}
            </li>
          ))}
        </ol>
      )}
      <Sub>Open decisions</Sub>
      {s.openDecisions.length === 0 ? (
        <Empty>No decision is waiting.</Empty>
      ) : (
        <ul className="flex flex-col gap-1 text-sm" data-testid="summary-decisions">
          {s.openDecisions.map((d) => (
            <li key={d.reference}>
              <span className="font-medium">{d.reference}</span> {d.title} — needed by {formatDate(d.neededBy)}, {daysLeftWords(d.daysLeft)}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

function Schedule({ f }: { f: ReportFigures }) {
  const s = f.schedule;
  return (
    <div className="flex flex-col gap-2">
      <Facts
        rows={[
          ["Baseline completion", formatDate(s.baselineCompletion)],
          ["Forecast completion", formatDate(s.forecastCompletion)],
          ["IEAC(t)", s.ieacT === null ? "—" : `${s.ieacT.toFixed(1)} weeks`],
          ["Completion IEAC(t) implies", formatDate(s.ieacTCompletion)],
        ]}
      />
      <div className="mt-3 grid gap-4 sm:grid-cols-2">
        <div>
          <Sub>Completed in {monthWords(f.month)}</Sub>
          {s.completedInMonth.length === 0 ? (
            <Empty>No milestone was completed in the month.</Empty>
          ) : (
            <ul className="text-sm">
              {s.completedInMonth.map((m) => (
                <li key={m.name}>
                  {m.name} — {formatDate(m.actualFinish)} (baseline {formatDate(m.baselineFinish)})
                </li>
              ))}
            </ul>
          )}
        </div>
        <div>
          <Sub>Due next month</Sub>
          {s.dueNextMonth.length === 0 ? (
            <Empty>No milestone is due next month.</Empty>
          ) : (
            <ul className="text-sm">
              {s.dueNextMonth.map((m) => (
                <li key={m.name}>
                  {m.name} — forecast {formatDate(m.forecastFinish)} (baseline {formatDate(m.baselineFinish)})
                </li>
              ))}
            </ul>
          )}
        </div>
      </div>
      <Sub>Slip against the baseline</Sub>
      {s.slips.length === 0 ? (
        <Empty>Every milestone is on its baseline.</Empty>
      ) : (
        <Suspense fallback={<ChartLoading />}>
          <SlipBars slips={s.slips} />
        </Suspense>
      )}
      <Sub>What drives the variance</Sub>
      {s.drivers.length === 0 ? (
        <Empty>No block is late.</Empty>
      ) : (
        <ul className="flex flex-col gap-1 text-sm" data-testid="report-drivers">
          {s.drivers.map((d) => (
            <li key={d.block}>
              <span className="font-medium">{d.block}</span>: {d.chain.join(" → ")}
            </li>
          ))}
        </ul>
      )}
      <Sub>Milestone trend: each key milestone's forecast at each month end</Sub>
      {s.trend.length === 0 ? (
        <Empty>No key milestone has a forecast yet.</Empty>
      ) : (
        <Suspense fallback={<ChartLoading />}>
          <MilestoneTrend trend={s.trend} />
        </Suspense>
      )}
    </div>
  );
}

function Budget({ f }: { f: ReportFigures }) {
  const b = f.budget;
  const { Walk } = useReportParts();
  const money = (v: number | null) => formatMoney(v, b.currency);
  return (
    <div className="flex flex-col gap-2">
      <Facts
        rows={[
          ["Original budget", money(b.originalBudget)],
          ["Approved changes", money(b.approvedChanges)],
          ["Current budget", money(b.currentBudget)],
          ["Projected final cost", money(b.projectedFinalCost)],
          ["Contingency held", money(b.contingency.held)],
          ["Contingency drawn", money(b.contingency.drawn)],
          ["Contingency remaining", money(b.contingency.remaining)],
          ["CPI · SPI", `${b.cpi === null ? "—" : b.cpi.toFixed(2)} · ${b.spi === null ? "—" : b.spi.toFixed(2)}`],
        ]}
      />
      {Walk ? (
        <Suspense fallback={<ChartLoading />}>
          <Walk figures={f} />
        </Suspense>
      ) : null}
      <Sub>Estimates at completion</Sub>
      <ul className="flex flex-col gap-2 text-sm">
        {b.eac.map((e) => (
          <li key={e.method}>
            <span className="font-medium tabular">{money(e.value)}</span> · <span className="font-mono text-xs">{e.formula}</span>
            {e.method === b.projectedFinalCostMethod ? " (the projected final cost)" : ""}. {e.sentence}
          </li>
        ))}
      </ul>
      <p className="text-sm text-ink-soft">{b.caution}</p>
    </div>
  );
}

function Facility({ f }: { f: ReportFigures }) {
  const { Ramp } = useReportParts();
  return (
    <div className="flex flex-col gap-2">
      {Ramp ? (
        <Suspense fallback={<ChartLoading />}>
          <Ramp figures={f} />
        </Suspense>
      ) : null}
      <Sub>Redundancy per system</Sub>
      {f.facility.systems.length === 0 ? (
        <Empty>No system is on the record yet.</Empty>
      ) : (
        <ul className="flex flex-col gap-1 text-sm">
          {f.facility.systems.map((s) => (
            <li key={s.name}>
              <span className="font-medium">{s.name}</span>: designed {s.design}, now {s.now}. {s.summary}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

function Risks({ f }: { f: ReportFigures }) {
  const { Grid } = useReportParts();
  const r = f.risks;
  return (
    <div className="flex flex-col gap-2">
      <p className="text-sm">
        {r.openRisks} open risk{r.openRisks === 1 ? "" : "s"} and {r.openIssues} open issue{r.openIssues === 1 ? "" : "s"} at the month end.
      </p>
      {r.top.length === 0 ? (
        <Empty>Nothing is open.</Empty>
      ) : (
        <ol className="flex flex-col gap-2 text-sm">
          {r.top.map((t) => (
            <li key={t.reference} data-trend={t.trend}>
              <span className="font-medium">
                {t.reference} {t.title}
              </span>{" "}
              — {t.kind === "issue" ? "issue" : "risk"}, {BAND_WORD[t.band]} (score {t.score}), {TREND_WORD[t.trend].toLowerCase()}; owner {t.owner}. {t.action}
            </li>
          ))}
        </ol>
      )}
      {Grid ? (
        <Suspense fallback={<ChartLoading />}>
          <Grid figures={f} />
        </Suspense>
      ) : null}
    </div>
  );
}

function Decisions({ f }: { f: ReportFigures }) {
  if (f.decisions.length === 0) return <Empty>No decision is needed.</Empty>;
  return (
    <ul className="flex flex-col gap-3 text-sm">
      {f.decisions.map((d) => (
        <li key={d.reference}>
          <p className="font-medium">
            {d.reference} {d.title}
          </p>
          <p>{d.question}</p>
          <p className="text-ink-soft">
            {d.decider} · needed by {formatDate(d.neededBy)} · {daysLeftWords(d.daysLeft)}
          </p>
          <p>Recommended: {d.recommendation}</p>
        </li>
      ))}
    </ul>
  );
}

function Photos({ f }: { f: ReportFigures }) {
  if (f.photos.length === 0) return <Empty>No photograph was cleared for this month.</Empty>;
  return (
    <ul className="grid gap-4 sm:grid-cols-2">
      {f.photos.map((p) => (
        <li key={p.mediaId}>
          <figure>
            <img src={p.url} alt={p.alt} width={p.width} height={p.height} loading="lazy" className="h-auto w-full border border-rule" />
            <figcaption className="mt-1 text-sm">
              {p.caption} <span className="text-ink-soft">· {formatDate(p.takenOn)}</span>
            </figcaption>
          </figure>
        </li>
      ))}
    </ul>
  );
}

function Cautions({ f }: { f: ReportFigures }) {
  return (
    <div className="flex flex-col gap-2 text-sm" data-testid="report-cautions">
      <p>{f.cautions.indicative}</p>
      <p>{f.cautions.site}</p>
    </div>
  );
}

const BODY: Record<ReportSection, (p: { f: ReportFigures }) => ReactNode> = {
  summary: Summary,
  schedule: Schedule,
  budget: Budget,
  facility: Facility,
  risks: Risks,
  decisions: Decisions,
  photos: Photos,
  cautions: Cautions,
};

function Appendix({ f }: { f: ReportFigures }) {
  return (
    <details className="border border-rule bg-sheet p-4">
      <summary className="cursor-pointer font-semibold">Appendix: the milestone table ({f.milestones.length})</summary>
      <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Milestone table">
        <table className="w-full text-sm">
          <thead>
            <tr className="border-b border-rule text-left text-ink-soft">
              <th scope="col" className="py-1 pr-3 font-medium">Milestone</th>
              <th scope="col" className="py-1 pr-3 font-medium">Baseline</th>
              <th scope="col" className="py-1 pr-3 font-medium">Forecast or actual</th>
              <th scope="col" className="py-1 pr-3 font-medium">Slip</th>
              <th scope="col" className="py-1 font-medium">Status</th>
            </tr>
          </thead>
          <tbody>
            {f.milestones.map((m) => (
              <tr key={`${m.system}-${m.name}`} className="border-b border-rule">
                <th scope="row" className="py-1 pr-3 text-left font-normal">{m.name}</th>
                <td className="tabular py-1 pr-3">{formatDate(m.baselineFinish)}</td>
                <td className="tabular py-1 pr-3">{formatDate(m.actualFinish ?? m.forecastFinish)}</td>
                <td className="py-1 pr-3">{slipWords(m.slipWorkingDays)}</td>
                <td className="py-1">{MILESTONE_STATUS_WORD[m.status]}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}

/** The lead's commentary on a section, as the server rendered and sanitised it. */
export function CommentaryHtml({ html }: { html: string | undefined }) {
  if (!html) return null;
  // The server renders this from the editor's JSON and sanitises it with an allow-list.
  return <div className={`${COMMENTARY} border-l-4 border-ink pl-4`} data-testid="report-commentary" dangerouslySetInnerHTML={{ __html: html }} />;
}

/**
 * The report as a web page, drawn from the same figures as its PDF: summary first, then each
 * section with the lead's commentary above its figures, and the milestone table last. The site
 * office passes `commentary` to put an editor in the commentary's place.
 */
export function ReportView({ figures, commentaryHtml, commentary }: { figures: ReportFigures; commentaryHtml: Record<string, string>; commentary?: (section: ReportSection) => ReactNode }) {
  return (
    <article className="flex flex-col gap-6" data-testid="report-view" aria-label={`Report for ${monthWords(figures.month)}`}>
      {REPORT_SECTIONS.map((section, i) => {
        const Body = BODY[section];
        return (
          <section key={section} className="border border-rule bg-sheet" data-testid={`report-section-${section}`} aria-labelledby={`report-${section}`}>
            <header className="border-b border-rule px-4 py-3">
              <p className="label-caps">Section {i + 1}</p>
              <h2 id={`report-${section}`} className="text-lg font-semibold">
                {SECTION_TITLE[section]}
              </h2>
            </header>
            <div className="flex flex-col gap-4 p-4">
              {commentary ? commentary(section) : <CommentaryHtml html={commentaryHtml[section]} />}
              <Body f={figures} />
            </div>
          </section>
        );
      })}
      <Appendix f={figures} />
    </article>
  );
}
