import { Navigate } from "react-router";
import { useSession } from "../../../features/auth/api";
import { MailboxView } from "../../../features/mailbox/components/mailbox-view";

/** Development only: what the local fake mail server received (SMTP_URL unset). */
export default function MailboxPage() {
  const session = useSession();
  if (session.data && !session.data.user.isAdmin) return <Navigate to="/" replace />;
  return (
    <main id="main" className="mx-auto max-w-6xl space-y-4 p-4">
      <h1 className="text-2xl font-bold">Local mailbox</h1>
      <p className="text-mist">
        E-mail Tideline sent while no real mail server is configured. Nothing here left this machine.
      </p>
      <MailboxView />
    </main>
  );
}
