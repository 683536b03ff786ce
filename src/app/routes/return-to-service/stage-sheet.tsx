import { Link, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { SUPPLY_LABELS, VOLTAGE_STEP_LABELS } from "../../../domain/return-to-service";
import { useRtsBoard } from "../../../features/return-to-service/api";
import { useSiteContext } from "../sites/site-layout";
import { stamp } from "../../../lib/clock";

/** The stage on paper for the clipboard: hold points with blank lines for signatures. Prints in black on white. */
export default function StageSheetPage() {
  const { site } = useSiteContext();
  const { boardId = "", stageId = "" } = useParams();
  const q = useRtsBoard(site.id, boardId);
  if (q.isPending) return <Loading what="Loading the stage sheet" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const s = q.data.stages.find((x) => x.id === stageId);
  if (!s) return <p>That stage was not found.</p>;
  return (
    <div className="stage-sheet space-y-4 bg-white p-6 text-black print:p-0">
      <p className="print:hidden">
        <Link to={paths.rtsBoard.href(site.id, boardId, stageId)} className="text-tide-700 underline">
          ← Back
        </Link>{" "}
        ·{" "}
        <button type="button" className="underline" onClick={() => window.print()}>
          Print
        </button>
      </p>
      <h1 className="text-2xl font-bold">
        {site.name} · {q.data.board.name}
      </h1>
      <h2 className="text-xl font-bold">
        Stage: {s.name} (attempt {s.attempt})
      </h2>
      <p>
        Brings back:{" "}
        {[...s.sections.map((x) => x.name), ...s.positions.map((p) => `${p.designation} ${p.circuit}`)].join("; ")}
      </p>
      <p>
        Supply: {SUPPLY_LABELS[s.supply]} · {VOLTAGE_STEP_LABELS[s.voltageStep]} {s.stepVolts ? `${s.stepVolts} V` : ""}{" "}
        · Protection: {s.protectionDevice} {s.protectionRatingA ?? "___"} A (limit {s.protectionLimitA ?? "___"} A) ·
        Qualified person: {s.qualifiedPerson?.name ?? "________________"}
      </p>
      <p className="border-2 border-black p-2 text-sm font-semibold">
        Flooded switchgear can kill: shock and arc flash. This sheet records; it does not authorise energisation. Work
        to NFPA 70E, lockout/tagout and local codes; a qualified person decides every step.
      </p>
      <table className="w-full border-collapse text-sm">
        <thead>
          <tr>
            <th className="border border-black p-1 text-left">#</th>
            <th className="border border-black p-1 text-left">Hold point</th>
            <th className="border border-black p-1 text-left">Open items when printed</th>
            <th className="border border-black p-1">Name</th>
            <th className="border border-black p-1">Signature</th>
            <th className="border border-black p-1">Date / time</th>
          </tr>
        </thead>
        <tbody>
          {s.gate.holdPoints.map((h, i) => (
            <tr key={h.stepId} className="break-inside-avoid">
              <td className="border border-black p-1 align-top">{i + 1}</td>
              <td className="border border-black p-1 align-top">
                <strong>{h.title}</strong>
                {h.qualifiedOnly && " (qualified person)"}
                <br />
                {s.steps.find((x) => x.id === h.stepId)?.detail}
              </td>
              <td className="border border-black p-1 align-top">
                {h.signoff && h.signoff.kind !== "struck"
                  ? `${h.signoff.kind === "released" ? "RELEASED WITH REASON" : "Signed"}: ${h.signoff.signerName}${h.signoff.reason ? ` — ${h.signoff.reason}` : ""}`
                  : h.blockers.map((b) => b.message).join(" ")}
              </td>
              <td className="h-12 w-32 border border-black p-1" />
              <td className="w-32 border border-black p-1" />
              <td className="w-28 border border-black p-1" />
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-sm">
        Watch: {s.watchHours} h, a check every {s.checkEveryHours} h. Printed {stamp(new Date())}.
      </p>
    </div>
  );
}
