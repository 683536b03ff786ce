import { useParams, useSearchParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { usePhotoBoards } from "../../../features/photos/api";
import { RequiredShotsEditor, ShootListPanel } from "../../../features/photos/components/shoot-list-panel";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function ShootListPage() {
  const { siteId = "" } = useParams();
  const { role } = useSiteContext();
  const [params, setParams] = useSearchParams();
  const boards = usePhotoBoards(siteId);
  const boardId = params.get("boardId") ?? boards.data?.[0]?.id;
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Shoot list</h1>
      {can(role, "photos.settings") && <RequiredShotsEditor siteId={siteId} />}
      {boards.isPending ? (
        <Loading what="Finding the boards" />
      ) : boards.isLoadingError || serverRefused(boards.error) ? (
        <ErrorPanel error={boards.error} />
      ) : (
        <>
          <label className="block max-w-md text-sm font-semibold text-mist">
            Board
            <select
              className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
              value={boardId ?? ""}
              onChange={(e) => setParams({ boardId: e.target.value })}
            >
              {(boards.data ?? []).map((b) => (
                <option key={b.id} value={b.id}>
                  {b.name}
                </option>
              ))}
            </select>
          </label>
          {boardId ? (
            <ShootListPanel siteId={siteId} boardId={boardId} />
          ) : (
            <p className="text-mist">This site has no boards yet.</p>
          )}
        </>
      )}
    </div>
  );
}
