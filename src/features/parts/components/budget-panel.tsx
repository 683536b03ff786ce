import type { ReactNode } from "react";
import { Money, useMoney } from "../../../lib/money";
import type { PartsBudget } from "../../../schemas/parts";

/**
 * Estimated (unit cost × quantity) against spent (acquisitions), per board and in total, in the
 * site's currency. Each figure sits in its own labelled cell with room between them, so two amounts
 * never read as one, and an amount never breaks across lines (a broken "12,4|50.00" reads as two figures): the
 * columns take the amounts' width and the board's name wraps instead; a table wider than a phone scrolls sideways.
 */
/** An amount's cell: never broken across lines. */
const AMOUNT = "whitespace-nowrap py-1 pl-3 text-right font-mono";

export function BudgetPanel({ budget, settings }: { budget: PartsBudget; settings?: ReactNode }) {
  const { currency } = useMoney();
  return (
    <section aria-labelledby="budget-title" className="min-w-0 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="budget-title" className="text-lg font-bold">
        Budget <span className="text-sm font-normal text-mist">in {currency}</span>
      </h2>
      <div className="mt-2 overflow-x-auto">
        <table className="w-full text-sm">
          <thead>
            <tr className="text-left text-mist">
              <th scope="col" className="py-1">
                Board
              </th>
              <th scope="col" className="py-1 pl-3 text-right">
                Estimated
              </th>
              <th scope="col" className="py-1 pl-3 text-right">
                Spent
              </th>
            </tr>
          </thead>
          <tbody>
            {budget.rows.map((r) => (
              <tr key={r.boardId || "none"} className="border-t border-hull-700 align-top">
                <th scope="row" className="break-words py-1 text-left font-normal">
                  {r.boardName}
                  {r.unestimatedLines > 0 && (
                    <span className="block text-xs text-fog">{r.unestimatedLines} line(s) not yet estimated</span>
                  )}
                </th>
                <td className={AMOUNT}>
                  <Money value={r.estimated} />
                </td>
                <td className={AMOUNT}>
                  <Money value={r.spent} />
                </td>
              </tr>
            ))}
          </tbody>
          <tfoot>
            <tr className="border-t-2 border-hull-500 align-top font-semibold">
              <th scope="row" className="py-1 text-left">
                Total
              </th>
              <td className={AMOUNT} data-testid="budget-estimated">
                <Money value={budget.total.estimated} />
              </td>
              <td className={AMOUNT} data-testid="budget-spent">
                <Money value={budget.total.spent} />
              </td>
            </tr>
          </tfoot>
        </table>
      </div>
      <p className="mt-2 text-xs text-fog">Spent on a line is shared across boards by how many each needs.</p>
      {settings && <div className="mt-3 border-t border-hull-700 pt-3">{settings}</div>}
    </section>
  );
}
