import { useNavigate, useParams } from "react-router";
import { ErrorPanel, Loading } from "../../../components/status";
import { paths } from "../../../config/paths";
import { AcceptInvitationForm } from "../../../features/invitations/components/accept-invitation-form";
import { useInvitationPreview } from "../../../features/invitations/api";
import { PublicFrame } from "./public-frame";

export default function InvitePage() {
  const { token = "" } = useParams();
  const navigate = useNavigate();
  const preview = useInvitationPreview(token);
  if (preview.isPending) return <Loading what="Opening the invitation" />;
  if (preview.isError)
    return (
      <PublicFrame title="This invitation cannot be used">
        <ErrorPanel error={preview.error} />
      </PublicFrame>
    );
  const inv = preview.data;
  return (
    <PublicFrame
      title={`Join the ${inv.siteName} crew`}
      intro={`${inv.invitedByName ?? "The curator"} invited you to Tideline.`}
    >
      <AcceptInvitationForm
        token={token}
        invitation={inv}
        onAccepted={(siteId) => navigate(paths.site.href(siteId), { replace: true })}
      />
    </PublicFrame>
  );
}
