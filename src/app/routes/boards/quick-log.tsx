import { useState } from "react";
import { Link, useSearchParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { RoleNotice } from "../../../features/inventory/components/role-notice";
import { paths } from "../../../config/paths";
import { tileBelowWaterLine } from "../../../domain/board-geometry";
import { COMPONENT_KIND_LABELS, CUSTODY_LABELS, type Custody } from "../../../domain/vocab";
import { usePosition } from "../../../features/inventory/api";
import type { Inspection, PositionDetail } from "../../../features/inventory/contract";
import { CustodyForm } from "../../../features/inventory/components/custody-form";
import { InspectionForm } from "../../../features/inventory/components/inspection-form";
import { KindGlyph } from "../../../features/inventory/components/kind-glyph";
import { PositionFinder } from "../../../features/inventory/components/position-finder";
import { gradeTone } from "../../../features/inventory/components/tile-style";
import { defectHref } from "../../../features/inventory/defect-link";
import { can } from "../../../domain/permissions";
import { InspectionPhotos } from "../../../features/photos/components/inspection-photos";
import type { CustodyMove } from "../../../schemas/inventory";
import { useSiteContext } from "../sites/site-layout";

function belowDefault(d: PositionDetail): boolean | null {
  const { board, position } = d;
  if (board.waterLineMm == null || !board.faceHeightMm) return null;
  try {
    return tileBelowWaterLine(position, {
      gridRows: board.gridRows,
      faceHeightMm: board.faceHeightMm,
      waterLineMm: board.waterLineMm,
    });
  } catch {
    return null;
  }
}

/** What was just logged: saved on the server, or waiting in the phone's outbox (`queuedId`, no signal). */
type Done =
  | { kind: "inspection"; inspection: Inspection | null; queuedId?: string }
  | { kind: "custody"; move: CustodyMove | null; toState: Custody; queuedId?: string }
  | null;

function Logged({
  done,
  siteId,
  d,
  onNext,
}: {
  done: NonNullable<Done>;
  siteId: string;
  d: PositionDetail;
  onNext: () => void;
}) {
  const i = done.kind === "inspection" ? done.inspection : null;
  if (done.queuedId)
    return (
      <div role="status" className="rounded-lg border-2 border-tide-300 bg-hull-850 p-3" data-testid="logged">
        <p className="font-semibold text-tide-300" data-testid="logged-pending">
          {done.kind === "inspection"
            ? "Inspection kept on this phone"
            : `Move kept on this phone — now ${CUSTODY_LABELS[done.toState]}`}
          : no signal. It is sent by itself when the connection returns.
        </p>
        <div className="mt-2">
          <InspectionPhotos
            key={done.queuedId}
            siteId={siteId}
            pendingParent={{
              itemId: done.queuedId,
              field: done.kind === "inspection" ? "inspectionId" : "custodyMoveId",
            }}
            defaultKind={done.kind === "inspection" ? "damage" : "during_work"}
            label={done.kind === "inspection" ? "Photos of this inspection" : "Photos of this move"}
          />
        </div>
        <div className="mt-2 flex flex-wrap gap-2 text-sm">
          <button
            type="button"
            onClick={onNext}
            className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
          >
            Next position
          </button>
        </div>
      </div>
    );
  return (
    <div role="status" className="rounded-lg border-2 border-kelp-400 bg-kelp-700/30 p-3" data-testid="logged">
      <p className="font-semibold text-kelp-300">
        {i ? (
          <>
            Inspection saved
            {i.astmGrade != null && (
              <>
                {" "}
                — grade {i.astmGrade} · {i.isoRi}
              </>
            )}
            .
          </>
        ) : (
          <>Move saved — now {CUSTODY_LABELS[done.kind === "custody" ? done.toState : "in_place"]}.</>
        )}
      </p>
      <div className="mt-2">
        {done.kind === "inspection" ? (
          <InspectionPhotos siteId={siteId} inspectionId={done.inspection?.id} label="Photos of this inspection" />
        ) : (
          <InspectionPhotos
            siteId={siteId}
            custodyMoveId={done.move?.id}
            defaultKind="during_work"
            label="Photos of this move"
          />
        )}
      </div>
      <div className="mt-2 flex flex-wrap gap-2 text-sm">
        <Link
          className="inline-flex min-h-11 items-center rounded-md px-3 ring-1 ring-hull-500"
          to={defectHref(siteId, { positionId: d.position.id, componentId: d.component?.id, inspection: i })}
        >
          Raise a defect
        </Link>
        <button
          type="button"
          onClick={onNext}
          className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
        >
          Next position
        </button>
      </div>
    </div>
  );
}

export default function QuickLogPage() {
  const { site, role } = useSiteContext();
  const [search, setSearch] = useSearchParams();
  const positionId = search.get("position");
  const [mode, setMode] = useState<"inspect" | "move">("inspect");
  const [done, setDone] = useState<Done>(null);
  const [saves, setSaves] = useState(0);
  const q = usePosition(site.id, positionId);
  const choose = (id: string | null) => {
    setDone(null);
    setMode("inspect");
    setSearch((s) => {
      if (id) s.set("position", id);
      else s.delete("position");
      return s;
    });
  };
  if (!can(role, "inventory.log"))
    return <RoleNotice>Your role reads the survey; volunteers and the curator log it.</RoleNotice>;
  return (
    <div className="mx-auto max-w-xl space-y-4">
      <h1 className="text-2xl font-bold">Quick log</h1>
      {!positionId && <PositionFinder siteId={site.id} onPick={choose} />}
      {positionId && q.isPending && <Loading what="Opening the position" />}
      {(q.isLoadingError || serverRefused(q.error)) && <ErrorPanel error={q.error} />}
      {positionId && q.data && (
        <>
          <section
            aria-label="Position"
            className="flex items-center gap-3 rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700"
          >
            <KindGlyph kind={q.data.position.kind} className="h-8 w-8 shrink-0 text-mist" />
            <div className="min-w-0 flex-1">
              <p className="font-mono text-2xl font-bold" data-testid="log-designation">
                {q.data.position.designation}
              </p>
              <p className="truncate text-sm text-mist">
                {COMPONENT_KIND_LABELS[q.data.position.kind]} · {q.data.board.name}
                {q.data.position.circuit ? ` · ${q.data.position.circuit}` : ""}
              </p>
            </div>
            {q.data.inspections[0] && (
              <span className={`rounded px-1.5 font-mono font-bold ${gradeTone(q.data.inspections[0].astmGrade)}`}>
                G{q.data.inspections[0].astmGrade ?? "–"}
              </span>
            )}
            <button
              type="button"
              onClick={() => choose(null)}
              className="min-h-11 rounded-md px-3 text-sm ring-1 ring-hull-600"
            >
              Change
            </button>
          </section>
          {done && <Logged done={done} siteId={site.id} d={q.data} onNext={() => choose(null)} />}
          {!q.data.component ? (
            <p className="text-fog">This position holds no component to log.</p>
          ) : (
            <>
              <div
                role="tablist"
                aria-label="What to log"
                className="grid grid-cols-2 gap-1 rounded-lg bg-hull-850 p-1 ring-1 ring-hull-700"
              >
                {(["inspect", "move"] as const).map((m) => (
                  <button
                    key={m}
                    type="button"
                    role="tab"
                    aria-selected={mode === m}
                    aria-controls={`log-${m}`}
                    id={`tab-${m}`}
                    onClick={() => setMode(m)}
                    className={`min-h-12 rounded-md font-semibold ${mode === m ? "bg-hull-700 text-brass-300" : "text-mist"}`}
                  >
                    {m === "inspect" ? "Inspection" : "Move the part"}
                  </button>
                ))}
              </div>
              <div role="tabpanel" id={`log-${mode}`} aria-labelledby={`tab-${mode}`}>
                {mode === "inspect" ? (
                  <InspectionForm
                    key={`${positionId}-${q.data.inspections.length}-${saves}`}
                    siteId={site.id}
                    componentId={q.data.component.id}
                    label={q.data.position.designation}
                    belowDefault={belowDefault(q.data)}
                    onSaved={(r) => {
                      setSaves((n) => n + 1);
                      setDone(
                        r.queued
                          ? { kind: "inspection", inspection: null, queuedId: r.item.id }
                          : { kind: "inspection", inspection: r.data },
                      );
                      window.scrollTo({ top: 0 });
                    }}
                  />
                ) : (
                  <CustodyForm
                    key={positionId}
                    siteId={site.id}
                    component={q.data.component}
                    latestInspection={newestInspection(q.data.inspections)}
                    label={q.data.position.designation}
                    canRelease={can(role, "custody.release")}
                    onSaved={(r) => {
                      setDone(
                        "move" in r
                          ? { kind: "custody", move: r.move, toState: r.move.toState as Custody }
                          : { kind: "custody", move: null, toState: r.toState, queuedId: r.queuedId },
                      );
                      window.scrollTo({ top: 0 });
                    }}
                  />
                )}
              </div>
            </>
          )}
          <p className="text-sm">
            <Link to={paths.board.href(site.id, q.data.board.id, q.data.position.id)}>See it on the board</Link>
          </p>
        </>
      )}
      <SafetyNotice compact />
    </div>
  );
}

/** The newest of a position's inspections the phone holds (its insulation and mechanism), or undefined. */
function newestInspection(list: PositionDetail["inspections"]) {
  const newest = list.reduce<PositionDetail["inspections"][number] | undefined>(
    (a, b) => (!a || b.inspectedAt > a.inspectedAt ? b : a),
    undefined,
  );
  return newest && { insulation: newest.insulation, mechanism: newest.mechanism };
}
