import { Link, useParams, useSearchParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { RoleNotice } from "../../../features/inventory/components/role-notice";
import { paths } from "../../../config/paths";
import { useBoard, usePosition } from "../../../features/inventory/api";
import { BoardForm } from "../../../features/inventory/components/board-form";
import { GeneratePositions } from "../../../features/inventory/components/generate-positions";
import { NameplateForm } from "../../../features/inventory/components/nameplate-form";
import { PositionForm } from "../../../features/inventory/components/position-form";
import { PositionOrderList } from "../../../features/inventory/components/position-order-list";
import { SectionsEditor } from "../../../features/inventory/components/sections-editor";
import { can } from "../../../domain/permissions";
import type { BoardDetail } from "../../../features/inventory/contract";
import { useSiteContext } from "../sites/site-layout";

function EditPosition({
  siteId,
  data,
  positionId,
  onClose,
}: {
  siteId: string;
  data: BoardDetail;
  positionId: string;
  onClose: () => void;
}) {
  const p = data.positions.find((x) => x.id === positionId);
  const detail = usePosition(siteId, positionId);
  if (!p) return null;
  return (
    <section aria-labelledby="edit-title" className="space-y-4 rounded-lg bg-hull-850 p-4 ring-2 ring-brass-400">
      <div className="flex items-center justify-between">
        <h2 id="edit-title" className="text-lg font-bold">
          Position <span className="font-mono">{p.designation}</span>
        </h2>
        <button type="button" onClick={onClose} className="min-h-11 rounded-md px-3 ring-1 ring-hull-600">
          Close
        </button>
      </div>
      <PositionForm
        key={p.id}
        siteId={siteId}
        boardId={data.board.id}
        position={p}
        sections={data.sections}
        onDone={(deleted) => deleted && onClose()}
      />
      <h3 className="text-base font-bold">Component nameplate</h3>
      {detail.isPending && <Loading />}
      {detail.data?.component && (
        <NameplateForm key={detail.data.component.id} siteId={siteId} component={detail.data.component} />
      )}
    </section>
  );
}

export default function BoardSetupPage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const [search, setSearch] = useSearchParams();
  const q = useBoard(site.id, boardId);
  const editing = search.get("position");
  const edit = (id: string | null) =>
    setSearch(
      (s) => {
        if (id) s.set("position", id);
        else s.delete("position");
        return s;
      },
      { replace: true },
    );
  if (!can(role, "inventory.curate")) return <RoleNotice>Only the curator sets up boards.</RoleNotice>;
  if (q.isPending) return <Loading />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  // Reordering sends every position of the board: set-up waits for the last page of a large one.
  if (!q.data.complete)
    return <Loading what={`Reading the board's positions (${q.data.positions.length} of ${q.data.total})`} />;
  const { board, sections, positions } = q.data;
  return (
    <div className="space-y-5">
      <nav aria-label="Breadcrumb" className="text-sm [&_a]:underline">
        <Link to={paths.boards.href(site.id)}>Boards</Link> /{" "}
        <Link to={paths.board.href(site.id, board.id)}>{board.name}</Link> / set-up
      </nav>
      <h1 className="text-2xl font-bold">Set up {board.name}</h1>
      <BoardForm key={board.id} siteId={site.id} board={board} />
      <SectionsEditor siteId={site.id} boardId={board.id} sections={sections} />
      <GeneratePositions siteId={site.id} boardId={board.id} sections={sections} gridRows={board.gridRows} />
      <div className="grid grid-cols-[minmax(0,1fr)] items-start gap-5 xl:grid-cols-[minmax(0,1fr)_30rem]">
        <PositionOrderList
          siteId={site.id}
          boardId={board.id}
          sections={sections}
          positions={positions}
          selectedId={editing}
          onEdit={(id) => {
            edit(id);
            setTimeout(() => document.getElementById("position-editor")?.scrollIntoView({ block: "start" }), 50);
          }}
        />
        <div
          id="position-editor"
          className="order-first space-y-5 xl:order-none xl:sticky xl:top-2 xl:max-h-[calc(100dvh-1rem)] xl:overflow-y-auto"
        >
          {editing && <EditPosition siteId={site.id} data={q.data} positionId={editing} onClose={() => edit(null)} />}
          <details className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700" open={!editing}>
            <summary className="min-h-8 cursor-pointer text-lg font-bold">Add one position</summary>
            <div className="mt-3">
              <PositionForm siteId={site.id} boardId={board.id} position={null} sections={sections} />
            </div>
          </details>
        </div>
      </div>
    </div>
  );
}
