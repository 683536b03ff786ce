import type { PartsBudget } from "../../../schemas/parts";
import { money } from "./badges";

/** Estimated (unit cost × quantity) against spent (acquisitions), per board and in total. */
export function BudgetPanel({ budget }: { budget: PartsBudget }) {
  return (
    <section aria-labelledby="budget-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="budget-title" className="text-lg font-bold">
        Budget
      </h2>
      <table className="mt-2 w-full text-sm">
        <thead>
          <tr className="text-left text-mist">
            <th scope="col" className="py-1">
              Board
            </th>
            <th scope="col" className="py-1 text-right">
              Estimated
            </th>
            <th scope="col" className="py-1 text-right">
              Spent
            </th>
          </tr>
        </thead>
        <tbody>
          {budget.rows.map((r) => (
            <tr key={r.boardId || "none"} className="border-t border-hull-700">
              <th scope="row" className="py-1 text-left font-normal">
                {r.boardName}
                {r.unestimatedLines > 0 && (
                  <span className="block text-xs text-fog">{r.unestimatedLines} line(s) not yet estimated</span>
                )}
              </th>
              <td className="py-1 text-right font-mono">{money(r.estimated)}</td>
              <td className="py-1 text-right font-mono">{money(r.spent)}</td>
            </tr>
          ))}
        </tbody>
        <tfoot>
          <tr className="border-t-2 border-hull-500 font-semibold">
            <th scope="row" className="py-1 text-left">
              Total
            </th>
            <td className="py-1 text-right font-mono" data-testid="budget-estimated">
              {money(budget.total.estimated)}
            </td>
            <td className="py-1 text-right font-mono" data-testid="budget-spent">
              {money(budget.total.spent)}
            </td>
          </tr>
        </tfoot>
      </table>
      <p className="mt-2 text-xs text-fog">Spent on a line is shared across boards by how many each needs.</p>
    </section>
  );
}
