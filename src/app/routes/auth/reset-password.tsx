import { Link, useNavigate, useParams } from "react-router";
import { ErrorPanel, Loading } from "../../../components/status";
import { paths } from "../../../config/paths";
import { NewPasswordForm } from "../../../features/password-reset/components/new-password-form";
import { useResetPreview } from "../../../features/password-reset/api";
import { PublicFrame } from "./public-frame";

export default function ResetPasswordPage() {
  const { token = "" } = useParams();
  const navigate = useNavigate();
  const preview = useResetPreview(token);
  if (preview.isPending) return <Loading what="Checking the link" />;
  if (preview.isError)
    return (
      <PublicFrame title="This link cannot be used">
        <ErrorPanel error={preview.error}>
          <Link to={paths.resetRequest.href()} className="mt-2 inline-block">
            Ask for a new link
          </Link>
        </ErrorPanel>
      </PublicFrame>
    );
  return (
    <PublicFrame title="Set a new password">
      <NewPasswordForm
        token={token}
        email={preview.data.email}
        onDone={() => navigate(paths.home.href(), { replace: true })}
      />
    </PublicFrame>
  );
}
