import { Navigate } from "react-router";
import { paths } from "../../config/paths";
import { useSession } from "../../features/auth/api";

/** The start page: straight into the only site, or the picker when there are several. */
export default function HomeRedirect() {
  const { data } = useSession();
  if (!data) return null;
  if (data.memberships.length === 1 && !data.user.isAdmin)
    return <Navigate to={paths.site.href(data.memberships[0].siteId)} replace />;
  return <Navigate to={paths.sites.href()} replace />;
}
