import { Link } from "react-router";
import { EmptyState } from "../../../components/status";
import { paths } from "../../../config/paths";
import { Money } from "../../../lib/money";
import { useMediaQuery } from "../../../lib/use-media-query";
import { usePrinting } from "../../../lib/use-printing";
import type { BoardRepairPlan, RepairPlan } from "../../../schemas/defects";
import { FlagMarks, SeverityBadge, StatusBadge } from "./badges";
import "../styles/repair-plan-print.css";

const hours = (h: number) => `${Math.round(h * 10) / 10} h`;

/**
 * The plan's first page: one row per board (open defects, effort, cost, where its most urgent defect stands in the
 * site's order), its sections under it; choosing a board shows its defects below (`boardHref`).
 */
export function PlanTotals({
  plan,
  chosen,
  boardHref,
}: {
  plan: RepairPlan;
  chosen: string | null;
  boardHref: (boardId: string) => string;
}) {
  if (!plan.boards.length)
    return (
      <EmptyState title="Nothing to repair">
        No open defects: the plan fills as the crew raises defects from the survey.
      </EmptyState>
    );
  return (
    <div>
      <p className="pb-1 text-sm text-mist">Open work per board. Choose a board to list its defects in order.</p>
      <div className="overflow-x-auto">
        <table className="w-full text-sm">
          <caption className="sr-only">Open work per board and section</caption>
          <thead>
            <tr className="bg-hull-800 text-left text-mist">
              <th scope="col" className="px-1 py-1 sm:px-2">
                Board / section
              </th>
              <th scope="col" className="px-1 py-1 sm:px-2 text-right">
                Defects
              </th>
              <th scope="col" className="px-1 py-1 sm:px-2 text-right">
                Most urgent
              </th>
              <th scope="col" className="px-1 py-1 sm:px-2 text-right">
                Effort
              </th>
              <th scope="col" className="px-1 py-1 sm:px-2 text-right">
                Cost
              </th>
            </tr>
          </thead>
          {plan.boards.map((b) => (
            <tbody key={b.boardId} className="border-b border-hull-700">
              <tr className={b.boardId === chosen ? "bg-hull-850 font-semibold" : "font-semibold"}>
                <th scope="row" className="px-1 py-1 sm:px-2 text-left">
                  <Link
                    to={boardHref(b.boardId)}
                    aria-current={b.boardId === chosen ? "true" : undefined}
                    className="inline-flex min-h-11 items-center"
                  >
                    {b.boardName}
                  </Link>
                </th>
                <td className="px-1 py-1 sm:px-2 text-right font-mono">{b.count}</td>
                <td className="px-1 py-1 sm:px-2 text-right font-mono">{b.firstRank}</td>
                <td className="px-1 py-1 sm:px-2 text-right font-mono">
                  <span className="whitespace-nowrap">{hours(b.effortHours)}</span>
                  {b.unestimated ? (
                    <>
                      {" "}
                      <span className="whitespace-nowrap">+ {b.unestimated} ?</span>
                    </>
                  ) : (
                    ""
                  )}
                </td>
                <td className="px-1 py-1 sm:px-2 text-right font-mono">
                  <Money value={b.cost} whole />
                </td>
              </tr>
              {b.sections.map((s) => (
                <tr key={s.sectionId ?? "none"} className="text-mist">
                  <th scope="row" className="py-1 pr-1 pl-4 text-left font-normal sm:pr-2 sm:pl-6">
                    {s.sectionName}
                  </th>
                  <td className="px-1 py-1 sm:px-2 text-right font-mono">{s.count}</td>
                  <td className="px-1 py-1 sm:px-2 text-right font-mono">{s.firstRank}</td>
                  <td className="px-1 py-1 sm:px-2 text-right font-mono">
                    <span className="whitespace-nowrap">{hours(s.effortHours)}</span>
                    {s.unestimated ? (
                      <>
                        {" "}
                        <span className="whitespace-nowrap">+ {s.unestimated} ?</span>
                      </>
                    ) : (
                      ""
                    )}
                  </td>
                  <td className="px-1 py-1 sm:px-2 text-right font-mono">
                    <Money value={s.cost} whole />
                  </td>
                </tr>
              ))}
            </tbody>
          ))}
        </table>
      </div>
      <p className="mt-1 text-xs text-mist">
        "Most urgent" is the place of the board's or section's first defect in the site's order; "?" counts defects with
        no effort estimate.
      </p>
    </div>
  );
}

type PlanSection = BoardRepairPlan["sections"][number];

/**
 * A section's defects on a phone (below 48rem, not printing): an ordered list, one item per defect read top to
 * bottom — its place in the site's order, reference, position, title and flags, severity and status, then assignee,
 * effort and cost — and the section's totals under it. Nine columns scrolled sideways in 328 px (683–700 px of
 * table on the demo site). Printed, the sheet is always the table.
 */
function SectionItems({ siteId, s }: { siteId: string; s: PlanSection }) {
  return (
    <section aria-label={s.sectionName} className="space-y-2">
      <h3 className="text-sm">
        <span className="font-semibold">{s.sectionName}</span>
        <span className="ml-2 text-mist">
          — {s.defects.length} defects · {hours(s.effortHours)}
          {s.unestimated ? ` + ${s.unestimated} not estimated` : ""} · cost <Money value={s.cost} whole />
        </span>
      </h3>
      <ol className="space-y-2">
        {s.defects.map((d) => (
          <li key={d.id} className="rounded-md bg-hull-850 p-3 text-sm ring-1 ring-hull-700" data-testid="plan-item">
            <p className="flex flex-wrap items-baseline gap-x-3">
              <span className="font-mono text-mist">
                #{d.rank}
                {d.pinned && (
                  <span title="Order set by the curator" className="ml-1 text-xs">
                    {d.pinned === "above" ? "↑" : "↓"} order<span className="sr-only"> set by the curator</span>
                  </span>
                )}
              </span>
              <Link className="font-mono font-semibold" to={paths.defect.href(siteId, d.id)}>
                D-{d.ref}
              </Link>
              <span className="font-mono">{d.designation ?? "—"}</span>
            </p>
            <p className="mt-1">{d.title}</p>
            <FlagMarks safety={d.safetyCritical} blocking={d.blocksEnergisation} />
            <div className="mt-2 flex flex-wrap items-center gap-2">
              <SeverityBadge severity={d.severity} />
              <StatusBadge status={d.status} />
            </div>
            <p className="mt-2 text-mist">
              {d.assigneeName ?? "Nobody assigned"} · effort{" "}
              <span className="font-mono text-chalk">{d.effortHours === null ? "?" : hours(d.effortHours)}</span> · cost{" "}
              <span className="font-mono text-chalk">
                <Money value={d.costEstimate} whole />
              </span>
            </p>
          </li>
        ))}
      </ol>
    </section>
  );
}

/** One board's active defects per section in the site's priority order, with totals per section. */
export function RepairPlanSheet({ siteId, plan }: { siteId: string; plan: BoardRepairPlan }) {
  const wide = useMediaQuery("(min-width: 48rem)");
  const printing = usePrinting();
  if (!plan.sections.length)
    return <EmptyState title="Nothing open on this board">Its defects are closed, deferred or accepted.</EmptyState>;
  const b = plan;
  if (!wide && !printing)
    return (
      <div className="plan-sheet space-y-6">
        <section className="plan-board space-y-4" aria-labelledby={`plan-${b.boardId}`}>
          <h2 id={`plan-${b.boardId}`} className="text-xl font-bold">
            {b.boardName}
          </h2>
          {b.sections.map((s) => (
            <SectionItems key={s.sectionId ?? "none"} siteId={siteId} s={s} />
          ))}
        </section>
      </div>
    );
  return (
    <div className="plan-sheet space-y-8">
      <section key={b.boardId} className="plan-board space-y-4" aria-labelledby={`plan-${b.boardId}`}>
        <h2 id={`plan-${b.boardId}`} className="text-xl font-bold">
          {b.boardName}
        </h2>
        {b.sections.map((s) => (
          <div key={s.sectionId ?? "none"} className="overflow-x-auto">
            <table className="w-full text-sm">
              <caption className="pb-1 text-left">
                <span className="font-semibold">{s.sectionName}</span>
                <span className="ml-2 text-mist">
                  — {s.defects.length} defects · {hours(s.effortHours)}
                  {s.unestimated ? ` + ${s.unestimated} not estimated` : ""} · cost <Money value={s.cost} whole />
                </span>
              </caption>
              <thead>
                <tr className="bg-hull-800 text-left text-mist">
                  <th scope="col" className="px-2 py-1">
                    Order
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Ref
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Position
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Defect
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Severity
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Status
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Assignee
                  </th>
                  <th scope="col" className="px-2 py-1 text-right">
                    Effort
                  </th>
                  <th scope="col" className="px-2 py-1 text-right">
                    Cost
                  </th>
                </tr>
              </thead>
              <tbody>
                {s.defects.map((d) => (
                  <tr key={d.id} className="border-b border-hull-700">
                    <td className="px-2 py-1 font-mono">
                      {d.rank}
                      {d.pinned && (
                        <span title="Order set by the curator" className="ml-1 text-xs">
                          {d.pinned === "above" ? "↑" : "↓"} order<span className="sr-only"> set by the curator</span>
                        </span>
                      )}
                    </td>
                    <td className="px-2 py-1 font-mono">
                      <Link to={paths.defect.href(siteId, d.id)}>D-{d.ref}</Link>
                    </td>
                    <td className="px-2 py-1 font-mono">{d.designation ?? "—"}</td>
                    <td className="px-2 py-1">
                      {d.title}
                      <FlagMarks safety={d.safetyCritical} blocking={d.blocksEnergisation} />
                    </td>
                    <td className="px-2 py-1">
                      <SeverityBadge severity={d.severity} />
                    </td>
                    <td className="px-2 py-1">
                      <StatusBadge status={d.status} />
                    </td>
                    <td className="px-2 py-1">{d.assigneeName ?? "—"}</td>
                    <td className="px-2 py-1 text-right font-mono">
                      {d.effortHours === null ? "?" : hours(d.effortHours)}
                    </td>
                    <td className="px-2 py-1 text-right font-mono">
                      <Money value={d.costEstimate} whole />
                    </td>
                  </tr>
                ))}
              </tbody>
              <tfoot>
                <tr className="font-semibold">
                  <th scope="row" colSpan={7} className="px-2 py-1 text-left">
                    Section total
                  </th>
                  <td className="px-2 py-1 text-right font-mono">{hours(s.effortHours)}</td>
                  <td className="px-2 py-1 text-right font-mono">
                    <Money value={s.cost} whole />
                  </td>
                </tr>
              </tfoot>
            </table>
          </div>
        ))}
      </section>
    </div>
  );
}
