import type { ReactNode } from "react";
import { useEffect, useRef } from "react";
import { Link } from "react-router";
import { CloseButton } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { COMPONENT_KIND_LABELS, CUSTODY_LABELS, HERITAGE_LABELS } from "../../../domain/vocab";
import { usePosition } from "../api";
import type { Component, PositionDetail } from "../contract";
import { DispositionControl } from "./disposition-control";
import { KindGlyph } from "./kind-glyph";
import { NAMEPLATE_LABELS, nameplateFieldsFor } from "./nameplate-fields";
import { AuditHistory, CustodyTrail, InspectionSummary } from "./position-history";

export interface PanelLinks {
  quickLog?: string;
  setup?: string;
  /** Built from the latest inspection, so the defect form is prefilled from the finding. */
  defect?: (latest: PositionDetail["inspections"][number] | undefined) => string;
  /** The component's test readings (built from its id once the panel knows it). */
  readings?: (componentId: string) => string;
}

function Nameplate({ c }: { c: Component }) {
  const rows = nameplateFieldsFor(c.kind)
    .map((k) => [NAMEPLATE_LABELS[k], c[k]] as const)
    .filter(([, v]) => v !== null && v !== "");
  return (
    <dl
      className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 rounded-md bg-hull-800 p-3 font-mono text-sm"
      aria-label="Nameplate"
    >
      {rows.length === 0 && <dd className="col-span-2 font-sans text-fog">Nameplate not recorded yet.</dd>}
      {rows.map(([label, v]) => (
        <div key={label} className="contents">
          <dt className="font-sans text-mist">{label}</dt>
          <dd>{String(v)}</dd>
        </div>
      ))}
      <dt className="font-sans text-mist">Heritage</dt>
      <dd className="font-sans">{HERITAGE_LABELS[c.heritage]}</dd>
      <dt className="font-sans text-mist">Tag</dt>
      <dd>{c.tagNumber ?? "not tagged"}</dd>
    </dl>
  );
}

const H = ({ children }: { children: React.ReactNode }) => <h3 className="mt-5 text-base font-bold">{children}</h3>;

/** Side panel (a full-height drawer on a phone) with everything about one position. */
export function PositionPanel({
  siteId,
  positionId,
  canDecide,
  links,
  onClose,
  photos,
  extra,
}: {
  siteId: string;
  positionId: string;
  canDecide: boolean;
  links: PanelLinks;
  onClose: () => void;
  /** The position's photo strip, composed in by the route (features do not import each other). */
  photos?: ReactNode;
  /** More about the position from other features (e.g. breaker operations), composed in by the route. */
  extra?: ReactNode;
}) {
  const q = usePosition(siteId, positionId);
  const closeRef = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    closeRef.current?.focus();
  }, [positionId]);
  useEffect(() => {
    const esc = (e: KeyboardEvent) => e.key === "Escape" && onClose();
    window.addEventListener("keydown", esc);
    return () => window.removeEventListener("keydown", esc);
  }, [onClose]);
  const d = q.data;
  return (
    <aside
      role="dialog"
      aria-modal="false"
      aria-labelledby="panel-title"
      data-testid="position-panel"
      className="fixed inset-0 z-40 overflow-y-auto bg-hull-900 p-4 pb-24 shadow-2xl ring-1 ring-hull-600 md:inset-y-0 md:left-auto md:right-0 md:w-[28rem] md:pb-4"
    >
      <div className="sticky -top-4 z-10 -mx-4 -mt-4 flex items-start justify-between gap-2 border-b border-hull-700 bg-hull-900 px-4 py-3">
        <div>
          <h2 id="panel-title" className="flex items-center gap-2 text-xl font-bold">
            {d && <KindGlyph kind={d.position.kind} className="h-6 w-6 text-mist" />}
            <span className="font-mono">{d?.position.designation ?? "…"}</span>
          </h2>
          {d && (
            <p className="text-sm text-mist">
              {COMPONENT_KIND_LABELS[d.position.kind]} · {d.board.name}
              {d.section ? ` · ${d.section.name}` : ""}
              {d.position.circuit ? ` · feeds ${d.position.circuit}` : ""}
            </p>
          )}
        </div>
        <CloseButton ref={closeRef} label="Close the position panel" onClick={onClose} />
      </div>
      {q.isPending && <Loading what="Opening the position" />}
      {(q.isLoadingError || serverRefused(q.error)) && <ErrorPanel error={q.error} />}
      {d && (
        <div className="mt-3">
          <nav aria-label="Position actions" className="flex flex-wrap gap-2 text-sm">
            {links.quickLog && (
              <Link
                className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-3 font-semibold text-hull-950 no-underline"
                to={links.quickLog}
              >
                Log inspection or move
              </Link>
            )}
            {links.defect && (
              <Link
                className="inline-flex min-h-11 items-center rounded-md px-3 ring-1 ring-hull-600"
                to={links.defect(d.inspections[0])}
              >
                Raise a defect
              </Link>
            )}
            {links.readings && d.component && (
              <Link
                className="inline-flex min-h-11 items-center rounded-md px-3 ring-1 ring-hull-600"
                to={links.readings(d.component.id)}
              >
                Test readings
              </Link>
            )}
            {links.setup && (
              <Link className="inline-flex min-h-11 items-center rounded-md px-3 ring-1 ring-hull-600" to={links.setup}>
                Edit position
              </Link>
            )}
          </nav>
          {d.component ? (
            <>
              <H>Component</H>
              <Nameplate c={d.component} />
            </>
          ) : (
            <p className="mt-3 text-fog">No component in this position.</p>
          )}
          {photos && <div className="mt-4">{photos}</div>}
          {extra && <div className="mt-4">{extra}</div>}
          <H>Latest inspection</H>
          {d.inspections[0] ? (
            <InspectionSummary i={d.inspections[0]} />
          ) : (
            <p className="text-sm text-fog">Not surveyed yet.</p>
          )}
          <H>Custody</H>
          {d.component && (
            <p className="mb-2 text-sm">
              <strong>{CUSTODY_LABELS[d.component.custody]}</strong>
              {d.component.custodyLocation && ` · ${d.component.custodyLocation}`}
            </p>
          )}
          <CustodyTrail moves={d.custodyMoves} />
          {d.component && (
            <div className="mt-5">
              <DispositionControl
                key={d.component.id}
                siteId={siteId}
                component={d.component}
                recommendation={d.recommendation}
                canDecide={canDecide}
              />
            </div>
          )}
          {d.inspections.length > 1 && (
            <>
              <H>Earlier inspections</H>
              <ol className="space-y-2">
                {d.inspections.slice(1).map((i) => (
                  <li key={i.id} className="rounded-md bg-hull-800 p-2">
                    <InspectionSummary i={i} />
                  </li>
                ))}
              </ol>
            </>
          )}
          <H>History of this position</H>
          <AuditHistory rows={d.history} />
        </div>
      )}
    </aside>
  );
}
