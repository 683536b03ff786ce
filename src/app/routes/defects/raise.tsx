import { useNavigate, useSearchParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { EmptyState, ErrorPanel, Loading } from "../../../components/status";
import { paths } from "../../../config/paths";
import { DEFECT_CATEGORIES, DEFECT_SEVERITIES, type DefectCategory, type DefectSeverity } from "../../../domain/vocab";
import { useCreateDefect, useDefectOptions, useFindingContext } from "../../../features/defects/api";
import { DefectForm } from "../../../features/defects/components/defect-form";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

const oneOf = <T extends string>(all: readonly T[], v: string | null) =>
  v && (all as readonly string[]).includes(v) ? (v as T) : undefined;

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
      {waiting && <Loading />}
      {options.isError && <ErrorPanel error={options.error} />}
      {options.data &&
        !waiting &&
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
              create.mutate(
                { ...b, ...(fromReading ? { fromReading } : {}) },
                { onSuccess: (d) => navigate(paths.defect.href(site.id, d.id)) },
              )
            }
            pending={create.isPending}
            error={create.error}
          />
        ))}
    </div>
  );
}
