import { Link } from "react-router";
import { paths } from "../../../config/paths";
import { useSession } from "../../../features/auth/api";
import { SignedInPlaces } from "../../../features/auth/components/signed-in-places";
import { NotificationSwitches } from "../../../features/notification-prefs/components/notification-switches";
import { ChangePasswordForm } from "../../../features/password-reset/components/change-password-form";

export default function AccountPage() {
  const session = useSession();
  const user = session.data?.user;
  return (
    <main id="main" className="mx-auto max-w-3xl space-y-6 p-4">
      <h1 className="text-2xl font-bold">Your account</h1>
      {user && (
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
          <dt className="text-mist">Name</dt>
          <dd>{user.name}</dd>
          <dt className="text-mist">E-mail</dt>
          <dd className="break-all">{user.email}</dd>
        </dl>
      )}
      {user && <ChangePasswordForm email={user.email} />}
      {user && <SignedInPlaces />}
      <NotificationSwitches />
      <p>
        <Link to={paths.home.href()}>Back to your site</Link>
      </p>
    </main>
  );
}
