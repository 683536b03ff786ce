import { Link, useNavigate } from "react-router";
import { RoleNotice } from "../../../features/inventory/components/role-notice";
import { paths } from "../../../config/paths";
import { BoardForm } from "../../../features/inventory/components/board-form";
import { can } from "../../../domain/permissions";
import { useSiteContext } from "../sites/site-layout";

export default function BoardNewPage() {
  const { site, role } = useSiteContext();
  const navigate = useNavigate();
  if (!can(role, "inventory.curate")) return <RoleNotice>Only the curator adds boards.</RoleNotice>;
  return (
    <div className="space-y-4">
      <nav aria-label="Breadcrumb" className="text-sm [&_a]:underline">
        <Link to={paths.boards.href(site.id)}>Boards</Link> / new
      </nav>
      <h1 className="text-2xl font-bold">New board</h1>
      <p className="text-mist">
        Typical flooded boards of this kind are 450/480 V, three-phase, 60 Hz and ungrounded; change what differs.
        Sections and positions come next.
      </p>
      <BoardForm siteId={site.id} onSaved={(b) => navigate(paths.boardSetup.href(site.id, b.id))} />
    </div>
  );
}
