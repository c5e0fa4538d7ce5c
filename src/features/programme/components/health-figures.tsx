import type { ReactNode } from "react";
import { Notice } from "../../../components/ui/sheet.tsx";
import { StatusMark } from "../../../components/ui/status-mark.tsx";
import { formatDate } from "../../../lib/format.ts";
import type { ProgrammeHealthResponse } from "#shared/schemas/programme.ts";
import { COUNTED_STATUSES, formatIndex, formatMoney, formatPercent, slipInWords } from "../words.ts";

function Figure({ label, value, children, testId }: { label: string; value: ReactNode; children: ReactNode; testId?: string }) {
  return (
    <div className="flex flex-col gap-1 border-t-2 border-ink pt-2" data-testid={testId}>
      <dt className="label-caps">{label}</dt>
      <dd className="tabular text-2xl font-semibold tracking-tight">{value}</dd>
      <dd className="text-sm text-ink-soft">{children}</dd>
    </div>
  );
}

/** "about 0.94 weeks' worth": an index read as weeks of work. */
function weeksWorth(v: number): string {
  return `${v.toFixed(2)} weeks' worth`;
}

/** The sentence that explains SPI at its value, in plain words. */
export function explainSpi(spi: number | null): string {
  if (spi === null) return "Nothing was planned to be finished by today yet, so there is no schedule index to give.";
  return `For every week of work planned to date, about ${weeksWorth(spi)} is done${spi >= 1 ? ": on or ahead of plan." : "."}`;
}

/** The sentence that explains SPI(t) (earned schedule) at its value. */
export function explainSpiT(spiT: number | null, es: number | null, actualTime: number | null): string {
  if (spiT === null || es === null || actualTime === null) return "Measured in time, the pace cannot be given until work was planned to start.";
  return `Measured in time: the work done by now was planned to be done ${es.toFixed(1)} weeks into the programme, and we are ${actualTime.toFixed(1)} weeks in.`;
}

/**
 * The programme's health figures, each with one plain sentence of what it means at
 * its current value. Money figures appear only when the API sends them.
 */
export function HealthFigures({ health, currency }: { health: ProgrammeHealthResponse; currency?: string | null }) {
  const es = health.earnedSchedule;
  const slip = health.completionSlipDays;
  const money = health.money;
  return (
    <div className="flex flex-col gap-5">
      <dl className="grid gap-x-6 gap-y-5 sm:grid-cols-2 lg:grid-cols-3">
        <Figure label="Percent complete" value={formatPercent(health.percentComplete)} testId="figure-percent">
          Each milestone counts by its weight; this much of the programme is done. By today the baseline planned {formatPercent(health.plannedPercent)}.
        </Figure>
        <Figure label="SPI" value={formatIndex(health.spi)} testId="figure-spi">
          {health.spi === null ? explainSpi(null) : `SPI ${formatIndex(health.spi)}: ${explainSpi(health.spi).charAt(0).toLowerCase()}${explainSpi(health.spi).slice(1)}`}
        </Figure>
        <Figure label="Forecast completion" value={formatDate(health.forecastCompletion)} testId="figure-forecast">
          {health.baselineCompletion
            ? `The last milestone is now expected to finish ${slip === null ? "" : slipInWords(slip)}; the baseline said ${formatDate(health.baselineCompletion)}.`
            : "No milestone has a date yet."}
        </Figure>
        <Figure label="SPI(t), earned schedule" value={formatIndex(es.spiT)} testId="figure-spit">
          {explainSpiT(es.spiT, es.es, es.actualTime)}
        </Figure>
        <Figure label="Pace-based finish" value={formatDate(health.earnedScheduleCompletion)}>
          {health.earnedScheduleCompletion
            ? `If the rest of the work goes at the pace so far, the programme would finish about then (IEAC(t) ${es.ieacT?.toFixed(1) ?? "—"} weeks).`
            : "Given once some work was planned and done."}
        </Figure>
        <Figure label="Milestones by status" value={health.counts.complete + health.counts.onProgramme + health.counts.atRisk + health.counts.behind}>
          <span className="flex flex-col gap-0.5">
            {COUNTED_STATUSES.map(({ status, count }) => (
              <span key={status} className="flex items-center gap-2">
                <StatusMark status={status} /> {health.counts[count]}
              </span>
            ))}
          </span>
        </Figure>
      </dl>
      {health.drivers && health.drivers.chain.length > 0 ? (
        <p className="text-sm" data-testid="drivers">
          <span className="font-semibold">What sets the completion date: </span>
          {health.drivers.chain.map((l) => (l.finish === null ? l.name : `${l.name} (${formatDate(l.finish)})`)).join(" ← ")}
          {health.drivers.chain.length > 1 ? <span className="text-ink-soft">, each waiting on the next.</span> : null}
        </p>
      ) : null}
      {money ? (
        <div className="flex flex-col gap-3">
          <h3 className="font-semibold">Cost</h3>
          <dl className="grid gap-x-6 gap-y-5 sm:grid-cols-2 lg:grid-cols-3">
            <Figure label="Budget at completion" value={formatMoney(money.bac, money.currency ?? currency)}>
              The sum of the budgets carried by milestones ({formatMoney(money.ev, money.currency ?? currency)} of it earned so far).
            </Figure>
            <Figure label="CPI" value={formatIndex(money.cpi)}>
              {money.cpi === null ? "No cost has been booked yet, so there is no cost index." : `Each ${formatMoney(100 * 100, money.currency ?? currency)} spent has earned about ${formatMoney(Math.round(money.cpi * 100 * 100), money.currency ?? currency)} of planned work.`}
            </Figure>
            <Figure label="Estimate at completion" value={formatMoney(money.eac, money.currency ?? currency)}>
              {money.eac === null ? "Given once cost has been booked." : `What the whole budget would cost if spending goes on at today's efficiency (budget ÷ CPI): ${money.vac === null || money.vac === 0 ? "on budget" : `about ${formatMoney(Math.abs(money.vac), money.currency ?? currency)} ${money.vac < 0 ? "over" : "under"} budget`}.`}
            </Figure>
          </dl>
        </div>
      ) : null}
      <Notice tone="caution" title="Indicative figures">
        Schedule and cost figures are computed from the programme as recorded and are indicative only. They are not a valuation, a certificate or engineering advice; design and operation are for qualified engineers under local codes.
      </Notice>
    </div>
  );
}
