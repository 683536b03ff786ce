import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { InsulationReading } from "../../../schemas/readings";
import { dryOutSeries, forecastWords } from "../../../domain/dry-out-series";
import { day, sig } from "../format";

/**
 * Corrected MΩ on a log axis against time, the minimum as a solid line, the fitted
 * forecast as a dashed extension labelled as an estimate. The caption says the same in
 * words for screen readers and for anyone who cannot tell the lines apart.
 */
export function DryOutChart({ readings, title }: { readings: InsulationReading[]; title: string }) {
  const s = dryOutSeries(readings);
  if (!s) return <p className="text-mist">No corrected readings to draw yet.</p>;
  const words = forecastWords(s);
  return (
    <figure className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700" data-testid="dry-out-chart">
      <div
        role="img"
        aria-label={`Dry-out chart of ${title}: ${s.points.length} readings corrected to ${s.baseC} °C${s.points.length ? `, latest ${sig(s.points[s.points.length - 1].y)} MΩ` : ""}. ${words}`}
      >
        <ResponsiveContainer width="100%" height={300}>
          <LineChart margin={{ top: 16, right: 16, bottom: 8, left: 8 }}>
            <CartesianGrid stroke="var(--color-hull-700)" />
            <XAxis
              dataKey="t"
              type="number"
              scale="time"
              domain={s.xDomain}
              tickFormatter={day}
              stroke="var(--color-mist)"
              allowDuplicatedCategory={false}
            />
            <YAxis
              type="number"
              scale="log"
              domain={s.yDomain}
              ticks={s.yTicks}
              allowDataOverflow
              tickFormatter={(v: number) => sig(v)}
              stroke="var(--color-mist)"
              width={56}
              label={{
                value: `MΩ at ${s.baseC} °C (log)`,
                angle: -90,
                position: "insideLeft",
                fill: "var(--color-mist)",
                dy: 60,
              }}
            />
            <Tooltip
              labelFormatter={(v) => day(Number(v))}
              formatter={(v, name) => [
                `${sig(Number(v))} MΩ`,
                name === "Estimate"
                  ? "Estimate (not a promise)"
                  : name === "Not valid for judging"
                    ? "Not valid for judging (dew point or freezing)"
                    : "Corrected",
              ]}
              contentStyle={{ background: "var(--color-hull-800)", border: "1px solid var(--color-hull-600)" }}
            />
            <ReferenceLine
              y={s.minimum}
              stroke="var(--color-flare-400)"
              strokeWidth={2}
              label={{
                value: `Minimum ${sig(s.minimum)} MΩ`,
                position: "insideTopLeft",
                fill: "var(--color-flare-300)",
              }}
            />
            {s.excluded.length > 0 && (
              <Line
                data={s.excluded}
                dataKey="y"
                name="Not valid for judging"
                stroke="none"
                legendType="none"
                isAnimationActive={false}
                dot={{
                  r: 5,
                  fill: "var(--color-hull-900)",
                  stroke: "var(--color-mist)",
                  strokeWidth: 2,
                  strokeDasharray: "2 2",
                }}
              />
            )}
            <Line
              data={s.points}
              dataKey="y"
              name="Corrected reading"
              stroke="var(--color-tide-400)"
              strokeWidth={2}
              dot={{ r: 4, fill: "var(--color-tide-300)" }}
              isAnimationActive={false}
            />
            {s.extension && (
              <Line
                data={s.extension}
                dataKey="y"
                name="Estimate"
                stroke="var(--color-brass-400)"
                strokeWidth={2}
                strokeDasharray="6 5"
                dot={false}
                isAnimationActive={false}
                label={({ x, y, index }: { x?: number | string; y?: number | string; index?: number }) =>
                  index === 1 ? (
                    <text
                      x={Number(x) - 4}
                      y={Number(y) - 10}
                      textAnchor="end"
                      fill="var(--color-brass-300)"
                      fontSize={12}
                    >
                      Estimate, not a promise
                    </text>
                  ) : (
                    <g />
                  )
                }
              />
            )}
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-2 text-sm">
        <span className="block">
          <span aria-hidden="true">● ─</span> corrected readings · <span aria-hidden="true">○</span> not valid for
          judging (not in the trend) · <span aria-hidden="true">━</span> minimum · <span aria-hidden="true">╌╌</span>{" "}
          estimate
        </span>
        {s.zeros > 0 && (
          <span className="block">
            {s.zeros} reading{s.zeros > 1 ? "s" : ""} of 0 MΩ (a dead short) cannot sit on a log axis: see the list
            below.
          </span>
        )}
        <span className="block font-semibold" data-testid="forecast-words" data-state={s.assessment.state}>
          {words}
        </span>
      </figcaption>
    </figure>
  );
}
