import { useState } from "react";
import { Link, useNavigate, useSearchParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, type DefectCategory, type DefectSeverity } from "../../../domain/vocab";
import { useCreateDefect, useDefectOptions, useFindingContext } from "../../../features/defects/api";
import { DefectForm } from "../../../features/defects/components/defect-form";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";
import { InspectionPhotos } from "../../../features/photos/components/inspection-photos";

const oneOf = <T extends string>(all: readonly T[], v: string | null) =>
  v && (all as readonly string[]).includes(v) ? (v as T) : undefined;

/** A defect raised with no signal: it waits on the phone; photos of it wait for it. */
function KeptDefect({
  siteId,
  itemId,
  title,
  onAnother,
}: {
  siteId: string;
  itemId: string;
  title: string;
  onAnother: () => void;
}) {
  return (
    <div
      role="status"
      className="space-y-2 rounded-lg border-2 border-tide-300 bg-hull-850 p-3"
      data-testid="defect-pending"
    >
      <p className="font-semibold text-tide-300">
        Defect “{title}” kept on this phone: no signal. It gets its number and joins the register when the connection
        returns.
      </p>
      <p className="text-sm text-mist">
        If it is a danger, mark the equipment and tell the curator or the qualified person in person now: nobody else
        sees it until it is sent.
      </p>
      <InspectionPhotos
        siteId={siteId}
        pendingParent={{ itemId, field: "defectId" }}
        defaultKind="damage"
        label="Photos of this defect"
      />
      <div className="flex flex-wrap gap-2 text-sm">
        <button
          type="button"
          onClick={onAnother}
          className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
        >
          Raise another
        </button>
        <Link
          className="inline-flex min-h-11 items-center rounded-md px-3 ring-1 ring-hull-500"
          to={paths.defects.href(siteId)}
        >
          Back to the register
        </Link>
      </div>
    </div>
  );
}

export default function RaiseDefectPage() {
  const { site, role } = useSiteContext();
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const q = {
    positionId: params.get("positionId") ?? undefined,
    componentId: params.get("componentId") ?? undefined,
    inspectionId: params.get("inspectionId") ?? undefined,
  };
  const options = useDefectOptions(site.id);
  const context = useFindingContext(site.id, q);
  const create = useCreateDefect(site.id);
  const [kept, setKept] = useState<{ itemId: string; title: string } | null>(null);
  const manage = can(role, "defects.manage");
  const readingKind = oneOf(["insulation", "contact", "thermal", "ground"] as const, params.get("readingKind"));
  const readingId = params.get("readingId");
  const fromReading = readingKind && readingId ? { kind: readingKind, id: readingId } : null;
  if (!can(role, "defects.raise"))
    return <EmptyState title="Your role reads the register">Volunteers and the curator raise defects.</EmptyState>;
  const waiting = options.isPending || (context.fetchStatus === "fetching" && context.isPending);
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Raise a defect</h1>
      {context.data && (
        <p className="text-mist">
          From the survey of position <span className="font-mono text-chalk">{context.data.designation}</span>.
        </p>
      )}
      {fromReading && (
        <p className="text-mist" data-testid="from-reading">
          Raised from a {fromReading.kind} reading that did not meet its criterion; the defect and the reading will link
          to each other.
        </p>
      )}
      <SafetyNotice compact />
      {kept && (
        <KeptDefect
          siteId={site.id}
          itemId={kept.itemId}
          title={kept.title}
          onAnother={() => {
            setKept(null);
            create.reset();
          }}
        />
      )}
      {!kept && waiting && <Loading />}
      {(options.isLoadingError || serverRefused(options.error)) && <ErrorPanel error={options.error} />}
      {options.data &&
        !waiting &&
        !kept &&
        (options.data.boards.length === 0 ? (
          <EmptyState title="No boards yet">
            Add the site's boards in the inventory first; defects belong to a board.
          </EmptyState>
        ) : (
          <DefectForm
            key={context.data?.positionId ?? "blank"}
            siteId={site.id}
            options={options.data}
            canManage={manage}
            prefill={{
              ...(context.data ?? { boardId: params.get("boardId") ?? undefined }),
              category: oneOf<DefectCategory>(DEFECT_CATEGORIES, params.get("category")),
              severity: oneOf<DefectSeverity>(DEFECT_SEVERITIES, params.get("severity")),
            }}
            onSubmit={(b) =>
              create
                .mutateAsync({ ...b, fromReading })
                .then((r) =>
                  r.queued
                    ? setKept({ itemId: r.item.id, title: b.title })
                    : navigate(paths.defect.href(site.id, r.data.id)),
                )
            }
          />
        ))}
    </div>
  );
}
