import { Link } from "react-router";
import { paths } from "../../../config/paths";
import { CsvImport } from "../../../features/inventory/components/csv-import";
import { RoleNotice } from "../../../features/inventory/components/role-notice";
import { can } from "../../../domain/permissions";
import { TimeZoneForm } from "../../../features/sites/components/time-zone-form";
import { useSiteContext } from "../sites/site-layout";

export default function InventoryImportPage() {
  const { site, role } = useSiteContext();
  return (
    <div className="space-y-4">
      <nav aria-label="Breadcrumb" className="text-sm [&_a]:underline">
        <Link to={paths.boards.href(site.id)}>Boards</Link> / import
      </nav>
      <h1 className="text-2xl font-bold">Inventory spreadsheet: export, edit, import</h1>
      <p className="max-w-3xl text-mist">
        Check the file first: every row is matched to its position and shown as new, changed (old → new), unchanged or
        needing a fix, before anything is written. The import then writes all the rows in one go, or none of them.
      </p>
      <TimeZoneForm siteId={site.id} timeZone={site.timeZone} canEdit={can(role, "inventory.curate")} />
      {can(role, "inventory.curate") ? (
        <CsvImport siteId={site.id} />
      ) : (
        <RoleNotice>Only the curator imports inventories.</RoleNotice>
      )}
    </div>
  );
}
