import { Link } from "react-router";
import { paths } from "../../../config/paths";
import { Register } from "../../../features/defects/components/register";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function RegisterPage() {
  const { site, role } = useSiteContext();
  const manage = can(role, "defects.manage");
  const raise = can(role, "defects.raise");
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h1 className="text-2xl font-bold">Defect register</h1>
          <p className="text-mist">
            Everything found wrong on {site.name}'s boards: open work first, highest priority first.{" "}
            <Link className="underline" to={paths.priorityHelp.href(site.id)}>
              How priority works
            </Link>
          </p>
        </div>
        {raise && (
          <Link
            to={paths.defectNew.href(site.id)}
            className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-4 font-semibold text-hull-950 no-underline"
          >
            Raise a defect
          </Link>
        )}
      </div>
      <Register siteId={site.id} canManage={manage} canRaise={raise} />
    </div>
  );
}
