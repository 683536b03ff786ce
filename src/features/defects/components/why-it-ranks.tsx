import { Link } from "react-router";
import { paths } from "../../../config/paths";
import { ACTIVE_STATUSES } from "../../../domain/defect-workflow";
import { DEFECT_STATUS_LABELS } from "../../../domain/vocab";
import type { DefectDetail } from "../../../schemas/defects";

/** The priority terms that made this defect's score, and where that puts it. */
export function WhyItRanks({ siteId, detail }: { siteId: string; detail: DefectDetail }) {
  const total = detail.terms.reduce((s, t) => s + t.points, 0);
  // Settled defects follow all open work whatever their score (src/domain/priority.ts `settled`).
  const status = detail.defect.status;
  const settled = !ACTIVE_STATUSES.includes(status);
  return (
    <section aria-labelledby="why-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="why-title" className="text-lg font-bold">
        Why it ranks here
      </h2>
      <p className="text-mist">
        {detail.rank ? (
          <>
            Number <strong className="text-chalk">{detail.rank}</strong> in the site's order
          </>
        ) : (
          "Not ranked"
        )}
        {detail.defect.pinned && (
          <> — placed {detail.defect.pinned === "above" ? "before" : "after"} another defect by the curator</>
        )}
        {settled && <> — {DEFECT_STATUS_LABELS[status].toLowerCase()}, so after all open work</>}.
      </p>
      <table className="mt-2 w-full max-w-md text-sm">
        <caption className="sr-only">Priority score by term</caption>
        <tbody>
          {detail.terms.map((t) => (
            <tr key={t.key} className="border-b border-hull-700">
              <th scope="row" className="py-1 text-left font-normal">
                {t.label}
              </th>
              <td
                className={`py-1 text-right font-mono ${t.points < 0 ? "text-rust-300" : t.points > 0 ? "text-kelp-300" : "text-fog"}`}
              >
                {t.points > 0 ? `+${t.points}` : t.points}
              </td>
            </tr>
          ))}
          <tr>
            <th scope="row" className="py-1 text-left font-semibold">
              Priority score
            </th>
            <td className="py-1 text-right font-mono font-semibold">{total}</td>
          </tr>
        </tbody>
      </table>
      <p className="mt-2 text-sm">
        <Link className="underline" to={paths.priorityHelp.href(siteId)}>
          How the priority score is worked out
        </Link>
      </p>
    </section>
  );
}
