import { Link } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { useRtsSettings } from "../../../features/return-to-service/api";
import { RtsCaution } from "../../../features/return-to-service/components/rts-caution";
import { TemplateEditor } from "../../../features/return-to-service/components/template-editor";
import { useSiteContext } from "../sites/site-layout";

/** The site's hold-point template and how recent an insulation reading must be (curator edits; others read). */
export default function RtsSettingsPage() {
  const { site, role } = useSiteContext();
  const q = useRtsSettings(site.id);
  return (
    <div className="space-y-4">
      <p>
        <Link to={paths.returnToService.href(site.id)} className="inline-flex min-h-11 items-center">
          ← Return to service
        </Link>
      </p>
      <h1 className="text-2xl font-bold">Hold-point template</h1>
      <RtsCaution compact />
      <p className="text-sm text-mist">
        Every new stage of every board on this site starts with these hold points, in this order. The energise and
        release hold points are signed only by a qualified person. The defaults follow NFPA 70E's electrically safe work
        condition (Article 120) and arc-flash boundary (130.5), cited from memory, and common practice for flooded
        switchgear.
      </p>
      {q.isPending ? (
        <Loading what="Loading the template" />
      ) : q.isLoadingError || serverRefused(q.error) ? (
        <ErrorPanel error={q.error} />
      ) : (
        <TemplateEditor siteId={site.id} settings={q.data} canEdit={can(role, "rts.plan")} />
      )}
    </div>
  );
}
