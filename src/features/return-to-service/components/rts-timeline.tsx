import { CartesianGrid, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";
import type { RtsEvent } from "../../../schemas/return-to-service";
import { shortDay, stamp } from "../../../lib/clock";

const LANES: Array<{
  kind: RtsEvent["kind"];
  label: string;
  shape: "circle" | "triangle" | "square" | "diamond" | "cross" | "star";
}> = [
  { kind: "energise", label: "Energised", shape: "triangle" },
  { kind: "de_energise", label: "De-energised", shape: "square" },
  { kind: "signoff", label: "Sign-offs", shape: "circle" },
  { kind: "watch_check", label: "Watch checks", shape: "diamond" },
  { kind: "incident", label: "Incidents", shape: "cross" },
  { kind: "operation", label: "Breaker operations", shape: "star" },
];
const COLOURS: Record<RtsEvent["kind"], string> = {
  energise: "#e5b24f",
  de_energise: "#9cc8ff",
  signoff: "#52c7a3",
  watch_check: "#b4c3cd",
  incident: "#ff6b6b",
  operation: "#ec8a5e",
};

/** The board's whole return to service on one time axis: one lane per kind of event, each with its own shape and word. */
export function RtsTimeline({ events }: { events: RtsEvent[] }) {
  if (!events.length) return <p className="text-mist">Nothing recorded yet.</p>;
  const lanes = LANES.filter((l) => events.some((e) => e.kind === l.kind));
  const ticks = lanes.map((_, i) => i);
  return (
    <figure aria-label="Timeline of the return to service">
      <div className="h-64 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 8, right: 16, bottom: 8, left: 8 }}>
            <CartesianGrid stroke="#2a3a46" />
            <XAxis
              type="number"
              dataKey="t"
              domain={["dataMin", "dataMax"]}
              scale="time"
              tickFormatter={(t: number) => shortDay(t)}
              stroke="#b4c3cd"
            />
            <YAxis
              type="number"
              dataKey="lane"
              ticks={ticks}
              domain={[-0.5, lanes.length - 0.5]}
              tickFormatter={(i) => lanes[i]?.label ?? ""}
              width={130}
              stroke="#b4c3cd"
              reversed
            />
            <Tooltip
              cursor={false}
              content={({ payload }) => {
                const e = payload?.[0]?.payload as (RtsEvent & { t: number }) | undefined;
                return e ? (
                  <div className="rounded bg-hull-950 p-2 text-sm text-chalk ring-1 ring-hull-600">
                    <p className="font-semibold">{e.title}</p>
                    <p>
                      {stamp(e.t)}
                      {e.by ? ` · ${e.by}` : ""}
                    </p>
                    {e.detail && <p>{e.detail}</p>}
                  </div>
                ) : null;
              }}
            />
            {lanes.map((l, i) => (
              <Scatter
                key={l.kind}
                name={l.label}
                shape={l.shape}
                fill={COLOURS[l.kind]}
                isAnimationActive={false}
                data={events.filter((e) => e.kind === l.kind).map((e) => ({ ...e, t: Date.parse(e.at), lane: i }))}
              />
            ))}
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-sm text-mist">
        Each lane is one kind of event, drawn with its own shape; the list below says the same in words.
      </figcaption>
    </figure>
  );
}
