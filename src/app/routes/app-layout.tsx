import { Link, Navigate, Outlet, useLocation, useNavigate } from "react-router";
import { Wordmark } from "../../components/wordmark";
import { ErrorPanel, Loading } from "../../components/status";
import { paths } from "../../config/paths";
import { useSession, useSignOut } from "../../features/auth/api";

/** Everything behind sign-in: the top bar and the session guard. */
export default function AppLayout() {
  const session = useSession();
  const signOut = useSignOut();
  const location = useLocation();
  const navigate = useNavigate();
  if (session.isPending) return <Loading what="Checking your session" />;
  if (session.isError)
    return (
      <main className="p-4">
        <ErrorPanel error={session.error} />
      </main>
    );
  if (!session.data) return <Navigate to={paths.signIn.href(location.pathname + location.search)} replace />;
  const { user, memberships } = session.data;
  return (
    <div className="min-h-dvh pb-20 md:pb-0">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:bg-hull-800 focus:p-2"
      >
        Skip to content
      </a>
      <header className="no-print flex items-center justify-between gap-3 border-b border-hull-700 bg-hull-900 px-4 py-2">
        <Link to={paths.home.href()} aria-label="Tideline start page" className="no-underline">
          <Wordmark />
        </Link>
        <nav aria-label="Account" className="flex items-center gap-2 text-sm sm:gap-3">
          {(memberships.length > 1 || user.isAdmin) && <Link to={paths.sites.href()}>Sites</Link>}
          {user.isAdmin && <Link to={paths.admin.href()}>Admin</Link>}
          <Link to={paths.account.href()}>Account</Link>
          <span className="hidden text-mist sm:inline" data-testid="user-name">
            {user.name}
          </span>
          <button
            type="button"
            className="min-h-11 whitespace-nowrap rounded-md px-2 text-chalk ring-1 ring-hull-600 hover:bg-hull-700 sm:px-3"
            onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate(paths.signIn.href()) })}
          >
            Sign out
          </button>
        </nav>
      </header>
      <Outlet />
    </div>
  );
}
