import { Link, Navigate, useParams } from "react-router";
import { ErrorPanel, Loading } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useTagLookup } from "../../../features/reports/api";
import { ApiError } from "../../../lib/api-client";

/** /t/<tag>, the short URL in every tag's QR code: opens the position, or says plainly that it is not on the person's sites. */
export default function TagPage() {
  const { tag = "" } = useParams();
  const q = useTagLookup(tag);
  if (q.isPending) return <Loading what={`Finding tag ${tag}`} />;
  if (q.isError) {
    const notFound = q.error instanceof ApiError && q.error.status === 404;
    return (
      <main id="main" className="mx-auto max-w-xl space-y-4 p-4">
        <h1 className="text-2xl font-bold">
          Tag <span className="font-mono">{tag}</span>
        </h1>
        {notFound ? (
          <p role="alert" className="rounded-md bg-hull-800 p-3 ring-1 ring-rust-400">
            {q.error.message}
          </p>
        ) : (
          <ErrorPanel error={q.error} />
        )}
        <Link to={paths.scan.href()} className="inline-flex min-h-11 items-center underline">
          Scan another tag
        </Link>
      </main>
    );
  }
  const matches = q.data.matches;
  if (matches.length === 1) {
    const m = matches[0];
    return <Navigate to={paths.board.href(m.siteId, m.boardId, m.positionId)} replace />;
  }
  return (
    <main id="main" className="mx-auto max-w-xl space-y-4 p-4">
      <h1 className="text-2xl font-bold">
        Tag <span className="font-mono">{tag}</span> is on more than one of your sites
      </h1>
      <ul className="space-y-2">
        {matches.map((m) => (
          <li key={m.positionId}>
            <Link
              to={paths.board.href(m.siteId, m.boardId, m.positionId)}
              className="flex min-h-11 items-center rounded-md bg-hull-800 px-3 ring-1 ring-hull-600 no-underline"
            >
              {m.siteName} · {m.boardName} · <span className="ml-1 font-mono">{m.designation}</span>
            </Link>
          </li>
        ))}
      </ul>
    </main>
  );
}
