import { CartesianGrid, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { addDays, fromDayNumber, toDayNumber } from "#shared/domain/calendar.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import { LineKey, type KeyLine } from "../../../components/ui/line-key.tsx";
import { longDay, whole } from "../facility-words.ts";
import { firstOfMonthTicks, tickWord } from "./month-ticks.ts";

// The public site's ink and accent (src/index.css), as recharts wants colours as values.
const INK_SOFT = "#4a4e57";
const RULE = "#d9d3c4";
const ACCENT = "#c2410c";

type Ramp = FacilityAnswer["ramp"];
type Measure = "racks" | "kw";

interface Point {
  day: number;
  baseline: number;
  forecast: number;
}

/**
 * The ramp as step points: zero a month before the first block, each block's step on its date,
 * and the last level held two months on, so every step is seen as a rise and a plateau.
 */
export function rampPoints(ramp: Ramp, measure: Measure): Point[] {
  if (ramp.length === 0) return [];
  const pick = (p: Ramp[number]) => (measure === "racks" ? { baseline: p.racksBaseline, forecast: p.racksForecast } : { baseline: p.kwBaseline, forecast: p.kwForecast });
  const first = ramp[0]!;
  const last = ramp[ramp.length - 1]!;
  return [
    { day: toDayNumber(addDays(first.date, -30)), baseline: 0, forecast: 0 },
    ...ramp.map((p) => ({ day: toDayNumber(p.date), ...pick(p) })),
    { day: toDayNumber(addDays(last.date, 60)), ...pick(last) },
  ];
}

const KEY: readonly KeyLine[] = [
  { label: "Baseline (the original plan)", stroke: INK_SOFT, width: 2, dash: "6 4" },
  { label: "Forecast (today's dates)", stroke: ACCENT, width: 3 },
];

function RampPanel({ ramp, measure }: { ramp: Ramp; measure: Measure }) {
  const points = rampPoints(ramp, measure);
  const unit = measure === "racks" ? "racks" : "kW";
  const title = measure === "racks" ? "Racks ready for service" : "IT load ready for service (kW)";
  const last = ramp[ramp.length - 1];
  const finalBaseline = last ? (measure === "racks" ? last.racksBaseline : last.kwBaseline) : 0;
  const finalForecast = last ? (measure === "racks" ? last.racksForecast : last.kwForecast) : 0;
  const ticks = points.length > 0 ? firstOfMonthTicks(points[0]!.day, points[points.length - 1]!.day) : [];
  return (
    <figure className="flex min-w-0 flex-col gap-2" data-testid={`ramp-${measure}`}>
      <figcaption>
        <p className="font-semibold">{title}</p>
        <p className="text-sm text-ink-soft">
          {last ? `By ${longDay(last.date)}: ${whole(finalForecast)} ${unit} on the forecast, ${whole(finalBaseline)} on the baseline.` : "No block has dates yet."}
        </p>
      </figcaption>
      <div className="h-56 w-full min-w-0 sm:h-64">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={points} margin={{ top: 12, right: 16, bottom: 4, left: 0 }}>
            <CartesianGrid stroke={RULE} strokeDasharray="2 4" />
            <XAxis dataKey="day" type="number" domain={["dataMin", "dataMax"]} ticks={ticks} tickFormatter={tickWord} interval={0} tick={{ fontSize: 11, fill: INK_SOFT }} stroke={INK_SOFT} />
            <YAxis allowDecimals={false} width={48} tickFormatter={(v: number) => whole(v)} tick={{ fontSize: 11, fill: INK_SOFT }} stroke={INK_SOFT} />
            <Tooltip
              isAnimationActive={false}
              labelFormatter={(d) => longDay(fromDayNumber(Number(d)))}
              formatter={(v, name) => [`${whole(Number(v))} ${unit}`, name === "baseline" ? "Baseline" : "Forecast"]}
            />
            <Line dataKey="baseline" name="baseline" type="stepAfter" stroke={INK_SOFT} strokeWidth={2} strokeDasharray="6 4" dot={false} isAnimationActive={false} />
            <Line dataKey="forecast" name="forecast" type="stepAfter" stroke={ACCENT} strokeWidth={3} dot={false} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

/**
 * The capacity ramp: cumulative racks and IT kW ready for service over time, the baseline
 * dashed and the forecast solid, so the two read apart without colour.
 */
export function CapacityRampChart({ ramp }: { ramp: Ramp }) {
  return (
    <div className="flex flex-col gap-4" data-testid="capacity-ramp">
      <LineKey lines={KEY} />
      <div className="grid gap-6 lg:grid-cols-2">
        <RampPanel ramp={ramp} measure="racks" />
        <RampPanel ramp={ramp} measure="kw" />
      </div>
    </div>
  );
}
