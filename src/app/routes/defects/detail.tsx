import { Link, useParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { Money } from "../../../lib/money";
import {
  DEFECT_CATEGORY_LABELS,
  DEFECT_SEVERITY_DEFINITIONS,
  HERITAGE_LABELS,
  type Heritage,
} from "../../../domain/vocab";
import { PARTS_STATE_LABELS, type DefectDetail } from "../../../schemas/defects";
import { useDefect, useDefectOptions, usePendingDefect, useRefreshEvidence } from "../../../features/defects/api";
import { useSession } from "../../../features/auth/api";
import { FlagMarks, SeverityBadge, StatusBadge } from "../../../features/defects/components/badges";
import { DefectHistory } from "../../../features/defects/components/defect-history";
import { EditPanel } from "../../../features/defects/components/edit-panel";
import { EvidencePanel } from "../../../features/defects/components/evidence-panel";
import { InspectionPhotos } from "../../../features/photos/components/inspection-photos";
import { PinPanel } from "../../../features/defects/components/pin-panel";
import { WhyItRanks } from "../../../features/defects/components/why-it-ranks";
import { WorkflowPanel } from "../../../features/defects/components/workflow-panel";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function DefectPage() {
  const { site, role } = useSiteContext();
  const { defectId = "" } = useParams();
  const q = useDefect(site.id, defectId);
  const options = useDefectOptions(site.id);
  const manage = can(role, "defects.manage");
  const me = useSession().data?.user.id;
  const refreshEvidence = useRefreshEvidence(site.id, defectId);
  const pending = usePendingDefect(site.id, defectId);
  if (q.isPending) return <Loading what="Opening the defect" />;
  if (q.isLoadingError || serverRefused(q.error))
    return (
      <ErrorPanel error={q.error}>
        <Link to={paths.defects.href(site.id)}>Back to the register</Link>
      </ErrorPanel>
    );
  const detail = q.data;
  // Edits and moves still on this phone are shown in place of the server's values, each marked.
  const d = { ...detail.defect, ...pending.fields } as DefectDetail["defect"];
  const differs = (...keys: Array<keyof DefectDetail["defect"]>) =>
    keys.some((k) => k in pending.fields && pending.fields[k] !== detail.defect[k]);
  const mark = (...keys: Array<keyof DefectDetail["defect"]>) => (differs(...keys) ? <Waiting /> : null);
  const facts: Array<[string, React.ReactNode]> = [
    ["Board", d.boardName],
    ["Section", d.sectionName ?? "—"],
    ["Position", <span className="font-mono">{d.designation ?? "—"}</span>],
    ["Category", DEFECT_CATEGORY_LABELS[d.category]],
    ["Component", detail.heritage ? HERITAGE_LABELS[detail.heritage as Heritage] : "—"],
    [
      "Effort",
      <>
        {d.effortHours === null ? "Not estimated" : `${d.effortHours} h`}
        {mark("effortHours")}
      </>,
    ],
    [
      "Cost",
      <>
        <Money value={d.costEstimate} />
        {mark("costEstimate")}
      </>,
    ],
    [
      "Parts",
      <>
        {`${PARTS_STATE_LABELS[d.partsState]}${d.partsNeeded ? `: ${d.partsNeeded}` : ""}`}
        {mark("partsState", "partsNeeded")}
      </>,
    ],
    ["Assignee", d.assigneeName ?? "Nobody"],
    [
      "Due",
      <>
        {d.dueOn ?? "—"}
        {mark("dueOn")}
      </>,
    ],
    ["Raised by", detail.defect.createdByName ?? "—"],
    ["Repaired by", detail.defect.repairedByName ?? "—"],
    ["Verified by", detail.defect.verifiedByName ?? "—"],
  ];
  return (
    <div className="space-y-4">
      <p className="no-print text-sm">
        <Link className="underline" to={paths.defects.href(site.id)}>
          ← Defect register
        </Link>
      </p>
      <header>
        <p className="font-mono text-brass-300">D-{d.ref}</p>
        {pending.count > 0 && (
          <p
            role="status"
            className="my-2 rounded-md border-2 border-tide-300 bg-hull-850 p-2 text-sm text-tide-300"
            data-testid="defect-pending-banner"
          >
            {pending.count === 1 ? "A change" : `${pending.count} changes`} of yours{" "}
            {pending.count === 1 ? "is" : "are"} on this phone, not on the server yet: what it changes is shown marked ◷
            and is sent when the signal returns.
          </p>
        )}
        <h1 className="text-2xl font-bold">
          {d.title}
          {mark("title")}
        </h1>
        <div className="mt-2 flex flex-wrap items-center gap-2">
          <StatusBadge status={d.status} />
          {mark("status")}
          <SeverityBadge severity={d.severity} />
          {mark("severity")}
          <FlagMarks safety={d.safetyCritical} blocking={d.blocksEnergisation} />
          {mark("safetyCritical", "blocksEnergisation")}
        </div>
        <p className="mt-1 text-sm text-mist">{DEFECT_SEVERITY_DEFINITIONS[d.severity]}</p>
        {d.statusReason && <p className="mt-1">Reason: {d.statusReason}</p>}
        {d.description && (
          <p className="mt-2 max-w-3xl whitespace-pre-line">
            {d.description}
            {mark("description")}
          </p>
        )}
      </header>
      {d.safetyCritical && <SafetyNotice compact />}
      {/* The form opens with the values waiting on the phone, so a second edit builds on the first. */}
      <EditPanel siteId={site.id} detail={{ ...detail, defect: d }} canManage={manage} />
      <div className="grid gap-4 lg:grid-cols-2">
        <section aria-labelledby="facts-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
          <h2 id="facts-title" className="text-lg font-bold">
            Details
          </h2>
          <dl className="mt-2 grid grid-cols-[8rem_1fr] gap-x-3 gap-y-1 text-sm">
            {facts.map(([k, v]) => (
              <div key={k} className="contents">
                <dt className="text-mist">{k}</dt>
                <dd>{v}</dd>
              </div>
            ))}
            <dt className="text-mist">Photos</dt>
            <dd>
              {detail.photoCount} attached
              {d.positionId && (
                <>
                  {" "}
                  ·{" "}
                  <Link className="underline" to={paths.board.href(site.id, d.boardId, d.positionId)}>
                    position {d.designation} and its photos
                  </Link>
                </>
              )}
            </dd>
          </dl>
        </section>
        <WhyItRanks siteId={site.id} detail={detail} />
        <WorkflowPanel siteId={site.id} detail={detail} options={options.data} canManage={manage} meId={me} />
        <PinPanel siteId={site.id} detail={detail} canManage={manage} />
      </div>
      {/* Shown in every state: it names the reading the defect was raised from (the two-way link). */}
      <EvidencePanel
        siteId={site.id}
        detail={detail}
        canLink={can(role, "defects.raise")}
        photos={
          can(role, "defects.photos") ? (
            <InspectionPhotos
              siteId={site.id}
              defectId={d.id}
              defaultKind="after_work"
              label="Photos of this defect"
              onUploaded={refreshEvidence}
            />
          ) : undefined
        }
      />
      <DefectHistory detail={detail} />
    </div>
  );
}

/** Beside a value that is this phone's, not yet the server's. */
function Waiting() {
  return (
    <span className="ml-2 whitespace-nowrap text-sm font-semibold text-tide-300" data-testid="pending-mark">
      ◷ waiting to send
    </span>
  );
}
