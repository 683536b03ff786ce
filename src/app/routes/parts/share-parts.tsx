import { useParams } from "react-router";
import { ErrorPanel, Loading } from "../../../components/status";
import { Wordmark } from "../../../components/wordmark";
import { ApiError } from "../../../lib/api-client";
import { useSharedList } from "../../../features/parts/api";
import { PrintSheet } from "../../../features/parts/components/print-sheet";

/** The public, read-only page behind a share link: no sign-in, no prices, contacts, notes or names. */
export default function SharePartsPage() {
  const { token = "" } = useParams();
  const shared = useSharedList(token);
  const gone = shared.error instanceof ApiError && (shared.error.status === 410 || shared.error.status === 404);
  return (
    <div className="min-h-dvh">
      <header className="border-b border-hull-700 bg-hull-900 px-4 py-2 print:hidden">
        <Wordmark />
      </header>
      <main id="main" className="mx-auto max-w-4xl space-y-4 p-4">
        {shared.isPending && <Loading what="Opening the shared list" />}
        {gone && (
          <div role="alert" className="rounded-md border border-hull-500 p-4">
            <h1 className="text-xl font-bold">This list is no longer shared</h1>
            <p className="mt-1 text-mist">{(shared.error as ApiError).message} Ask the crew for a new link.</p>
          </div>
        )}
        {shared.isError && !gone && <ErrorPanel error={shared.error} />}
        {shared.data && (
          <>
            <h1 className="text-2xl font-bold">Parts wanted for {shared.data.siteName}</h1>
            <p className="text-mist">
              A restoration crew is looking for these parts. If you have one or know where one is, please tell the
              person who sent you this link and quote the line number. Shapes mark how strictly a part must follow the
              original: ◆ original pattern only, ◈ period equivalent acceptable, ○ modern equivalent acceptable.
            </p>
            <PrintSheet lines={shared.data.lines.map((l) => ({ ...l, photoUrl: l.photoUrls[0] ?? null }))} />
          </>
        )}
      </main>
    </div>
  );
}
