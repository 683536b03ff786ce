import { Link, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { usePhotoBoards, usePhotoMutations, usePhotos } from "../../../features/photos/api";
import { BatchAssign } from "../../../features/photos/components/batch-assign";
import { UploadPanel } from "../../../features/photos/components/upload-panel";
import { useSiteContext } from "../sites/site-layout";
import { useSitePositionSearch } from "./position-search";
import { can } from "../../../domain/permissions";

export default function PhotoDesk() {
  const { siteId = "" } = useParams();
  const { role } = useSiteContext();
  const boards = usePhotoBoards(siteId);
  const unassigned = usePhotos(siteId, { unassigned: true }, can(role, "photos.file"));
  const { invalidate } = usePhotoMutations(siteId);
  if (!can(role, "photos.file"))
    return (
      <div className="space-y-2">
        <h1 className="text-2xl font-bold">Photo desk</h1>
        <p className="text-mist">
          The photographer and the curator upload and file whole shoots here. Volunteers add photos to their own
          inspections and custody moves from the quick log, and to the defects they work on.
        </p>
        <Link className="underline" to={paths.photoGallery.href(siteId)}>
          See the photos
        </Link>
      </div>
    );
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-bold">Photo desk</h1>
        <p className="text-mist">
          Upload a shoot, then file every picture to its position.{" "}
          <Link className="underline" to={paths.photoShootList.href(siteId)}>
            Shoot list
          </Link>{" "}
          ·{" "}
          <Link className="underline" to={paths.photoGallery.href(siteId)}>
            Galleries
          </Link>
        </p>
      </div>
      {(boards.isLoadingError || serverRefused(boards.error)) && <ErrorPanel error={boards.error} />}
      <UploadPanel
        siteId={siteId}
        boards={boards.data ?? []}
        useSiteSearch={useSitePositionSearch}
        onUploaded={(p) => void invalidate([p])}
      />
      {unassigned.isPending || boards.isPending ? (
        <Loading what="Finding unfiled photos" />
      ) : unassigned.isLoadingError || serverRefused(unassigned.error) ? (
        <ErrorPanel error={unassigned.error} />
      ) : (
        <BatchAssign
          siteId={siteId}
          photos={unassigned.data}
          boards={boards.data ?? []}
          useSiteSearch={useSitePositionSearch}
        />
      )}
    </div>
  );
}
