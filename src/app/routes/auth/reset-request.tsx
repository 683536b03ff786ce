import { ResetRequestForm } from "../../../features/password-reset/components/reset-request-form";
import { PublicFrame } from "./public-frame";

export default function ResetRequestPage() {
  return (
    <PublicFrame
      title="Forgot your password?"
      intro="Enter your e-mail. If it belongs to an account, we send a link to set a new password."
    >
      <ResetRequestForm />
    </PublicFrame>
  );
}
