import { useDeferredValue } from "react";
import { Link } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { CUSTODY, CUSTODY_LABELS, DISPOSITION_LABELS, DISPOSITIONS, WATER_TYPE_LABELS } from "../../../domain/vocab";
import { GRADE_KEYS, type Overview } from "../../../schemas/inventory";
import { useFloodEvents, useOverview } from "../api";
import { custodyPattern, DISPOSITION_STYLE, gradeBar } from "./tile-style";

const pct = (n: number, of: number) => (of ? Math.round((n / of) * 100) : 0);

/** One labelled bar: the number is always written out; the bar only repeats it. */
function Bar({
  label,
  n,
  of,
  fill,
  style,
  stacked,
}: {
  label: React.ReactNode;
  n: number;
  of: number;
  fill: string;
  style?: React.CSSProperties;
  stacked?: boolean;
}) {
  return (
    <li
      className={`grid items-center gap-x-2 text-sm ${stacked ? "grid-cols-[1fr_4.5rem]" : "grid-cols-[1fr_4.5rem] sm:grid-cols-[minmax(7rem,10rem)_1fr_4.5rem]"}`}
    >
      <span className={stacked ? "col-span-2" : "col-span-2 truncate sm:col-span-1"}>{label}</span>
      <span className="h-3 overflow-hidden rounded-full bg-hull-700" aria-hidden="true">
        <span className={`block h-full rounded-full ${fill}`} style={{ width: `${pct(n, of)}%`, ...style }} />
      </span>
      <span className="text-right font-mono tabular-nums">
        {n} <span className="text-fog">· {pct(n, of)}%</span>
      </span>
    </li>
  );
}

function Card({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section aria-label={title} className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h3 className="text-sm font-semibold uppercase tracking-wide text-fog">{title}</h3>
      <div className="mt-3">{children}</div>
    </section>
  );
}

/** The flood that drives the recommendations, in one line, with a link to record or correct it. */
function FloodLine({ siteId, floodHref }: { siteId: string; floodHref?: string }) {
  const q = useFloodEvents(siteId);
  const e = q.data?.[0];
  if (q.isPending) return null;
  return (
    <p className="rounded-md bg-hull-850 px-3 py-2 text-sm ring-1 ring-hull-700">
      <span aria-hidden="true" className="text-tide-300">
        ≈{" "}
      </span>
      {e ? (
        <>
          Flood of {e.occurredOn}: <strong>{WATER_TYPE_LABELS[e.waterType]}</strong>
          {e.maxDepthM != null && `, up to ${e.maxDepthM} m`}
          {e.hoursSubmerged != null && `, about ${e.hoursSubmerged} h submerged`}. It drives every recommended
          disposition.
        </>
      ) : (
        <>No flood event recorded: recommendations wait for it.</>
      )}
      {floodHref && (
        <>
          {" "}
          <Link to={floodHref} className="underline">
            {e ? "Correct it" : "Record the flood"}
          </Link>
        </>
      )}
    </p>
  );
}

/**
 * The four breakdowns (one row a disposition, custody, grade and board: a hundred rows and links on a site of many
 * boards), drawn on a render React does in the background right after the one that first shows the summary
 * (useDeferredValue with an initial value), so the page's heading and the totals paint first instead of waiting for
 * them. Whatever the page puts below the summary is deferred the same way (SiteHome), so nothing visible moves down
 * when they come.
 */
function Breakdowns({ o, boardHref }: { o: Overview; boardHref: (boardId: string) => string }) {
  const drawn = useDeferredValue(true, false);
  if (!drawn) return null;
  const total = o.totals.positions;
  return (
    <div className="grid gap-3 lg:grid-cols-2">
      <Card title="By disposition">
        <ul className="space-y-1.5">
          {[...DISPOSITIONS, "undecided" as const].map((d) => (
            <Bar
              key={d}
              of={total}
              n={o.byDisposition[d]}
              fill={DISPOSITION_STYLE[d].bar}
              label={
                <>
                  <span aria-hidden="true">{DISPOSITION_STYLE[d].mark} </span>
                  {d === "undecided" ? "Not decided" : DISPOSITION_LABELS[d]}
                </>
              }
            />
          ))}
        </ul>
      </Card>
      <Card title="Where the parts are">
        <ul className="space-y-1.5">
          {CUSTODY.map((c) => (
            <Bar
              key={c}
              of={total}
              n={o.byCustody[c]}
              fill="bg-tide-400"
              style={custodyPattern(c)}
              label={CUSTODY_LABELS[c]}
            />
          ))}
        </ul>
      </Card>
      <Card title="By rust grade (ASTM D610, latest inspection)">
        <ul className="space-y-1.5">
          {GRADE_KEYS.map((g) => (
            <Bar
              key={g}
              of={total}
              n={o.byGrade[g]}
              fill={gradeBar(g === "ungraded" ? null : Number(g))}
              label={g === "ungraded" ? "Not graded" : `Grade ${g}`}
            />
          ))}
        </ul>
      </Card>
      <Card title="By board">
        <ul className="space-y-1.5">
          {o.boards.map((b) => (
            <Bar
              key={b.id}
              of={b.positions}
              n={b.surveyed}
              fill="bg-brass-400"
              stacked
              label={
                <Link to={boardHref(b.id)} className="inline-flex min-h-6 items-center">
                  {b.name}
                </Link>
              }
            />
          ))}
        </ul>
        <p className="mt-2 text-xs text-fog">Surveyed positions of each board.</p>
      </Card>
    </div>
  );
}

/** Survey progress of the whole site at a glance, for every role. */
export function ProgressSummary({
  siteId,
  boardHref,
  floodHref,
}: {
  siteId: string;
  boardHref: (boardId: string) => string;
  floodHref?: string;
}) {
  const q = useOverview(siteId);
  if (q.isPending) return <Loading what="Counting the positions" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const o = q.data;
  const total = o.totals.positions;
  return (
    <section aria-labelledby="progress-title" className="space-y-3" data-testid="progress-summary">
      <h2 id="progress-title" className="text-xl font-bold">
        Survey progress
      </h2>
      <FloodLine siteId={siteId} floodHref={floodHref} />
      <div className="grid gap-3 sm:grid-cols-3">
        <div className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
          <p className="text-sm text-mist">Positions surveyed</p>
          <p className="font-mono text-3xl font-bold" data-testid="surveyed-count">
            {o.totals.surveyed}
            <span className="text-lg text-fog"> / {total}</span>
          </p>
          <div className="mt-2 h-2 rounded-full bg-hull-700" aria-hidden="true">
            <div className="h-2 rounded-full bg-brass-400" style={{ width: `${pct(o.totals.surveyed, total)}%` }} />
          </div>
          <p className="mt-1 text-xs text-fog">{pct(o.totals.surveyed, total)}% have at least one inspection</p>
        </div>
        <div className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
          <p className="text-sm text-mist">Dispositions decided</p>
          <p className="font-mono text-3xl font-bold">
            {o.totals.bySurveyState.decided}
            <span className="text-lg text-fog"> / {total}</span>
          </p>
          <p className="mt-1 text-xs text-fog">
            {o.totals.bySurveyState.inspected} inspected awaiting a decision · {o.totals.bySurveyState.not_surveyed} not
            surveyed
          </p>
        </div>
        <div className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
          <p className="text-sm text-mist">Original fabric retained</p>
          <p className="font-mono text-3xl font-bold">
            {o.originalRetainedPercent == null ? "—" : `${Math.round(o.originalRetainedPercent)}%`}
          </p>
          <p className="mt-1 text-xs text-fog">Original components neither scrapped nor missing, of all positions</p>
        </div>
      </div>
      <Breakdowns o={o} boardHref={boardHref} />
    </section>
  );
}
