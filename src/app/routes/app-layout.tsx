import { Suspense, useEffect, useState } from "react";
import { Link, Navigate, Outlet, useLocation, useNavigate } from "react-router";
import { laterPart } from "../../components/later-part";
import { SyncBar } from "../../components/sync-bar";
import { setOutboxUser, useOutbox } from "../../lib/outbox";
import { useQueryClient } from "@tanstack/react-query";
import { forgetPersistedReads, useKeptState } from "../persist";
import { Wordmark } from "../../components/wordmark";
import { ErrorPanel, Loading, serverRefused } from "../../components/status";
import { paths } from "../../config/paths";
import { useSession, useSignOut } from "../../features/auth/api";

/**
 * The prepared-files notice comes in a chunk of its own, after the page around it: its zod schemas (built when the
 * module is evaluated) were part of the app layout's chunk, a long task on the phone before any page behind sign-in
 * could render. It shows nothing until its own read answers, as before.
 */
const NoticeStrip = laterPart(
  "The prepared-files notice",
  () => import("../../features/prepared-files/components/notice-strip").then((m) => m.NoticeStrip),
  { quiet: true },
);

/** Everything behind sign-in: the top bar and the session guard. */
export default function AppLayout() {
  const session = useSession();
  const signOut = useSignOut();
  const location = useLocation();
  const navigate = useNavigate();
  const outbox = useOutbox();
  const kept = useKeptState(useQueryClient());
  const [confirming, setConfirming] = useState(false);
  const userId = session.data?.user.id ?? null;
  useEffect(() => setOutboxUser(userId), [userId]);
  const unsent = outbox.items.length;
  const doSignOut = () =>
    signOut.mutate(undefined, {
      onSuccess: () => {
        setConfirming(false);
        void forgetPersistedReads();
        navigate(paths.signIn.href());
      },
    });
  if (session.isPending) return <Loading what="Checking your session" />;
  if (session.isLoadingError || serverRefused(session.error))
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
            onClick={() => (unsent > 0 ? setConfirming(true) : doSignOut())}
          >
            Sign out
          </button>
        </nav>
      </header>
      {confirming && (
        <div role="alertdialog" aria-labelledby="unsent-title" className="border-b-2 border-flare-400 bg-hull-850 p-3">
          <p id="unsent-title" className="font-semibold text-flare-300">
            {unsent} change{unsent === 1 ? "" : "s"} on this phone {unsent === 1 ? "has" : "have"} not reached the
            server yet.
          </p>
          <p className="text-sm text-mist">
            They stay on this phone for your account only and are sent when you sign in here again; nobody else who
            signs in on this phone sees or sends them.
          </p>
          <div className="mt-2 flex flex-wrap gap-2">
            <button
              type="button"
              className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
              onClick={() => setConfirming(false)}
            >
              Stay signed in
            </button>
            <button type="button" className="min-h-11 rounded-md px-3 ring-1 ring-flare-400" onClick={doSignOut}>
              Sign out anyway
            </button>
          </div>
        </div>
      )}
      <SyncBar kept={kept} />
      <Suspense fallback={null}>
        <NoticeStrip filesHref={paths.reports.href} />
      </Suspense>
      <Outlet />
    </div>
  );
}
