import { Link } from "react-router";
import { PREPARED_KIND_LABELS } from "../../../schemas/prepared-files";
import { useMarkSeen, useNotices } from "../api";

/**
 * The in-app notice: each file the person asked for that is now made (or could not be made),
 * until they download or dismiss it. `filesHref` gives the page listing a site's files.
 */
export function NoticeStrip({ filesHref }: { filesHref: (siteId: string) => string }) {
  const notices = useNotices();
  const seen = useMarkSeen();
  const items = notices.data?.notices ?? [];
  if (items.length === 0) return null;
  return (
    <section aria-label="Notices" aria-live="polite" className="no-print border-b border-hull-700 bg-hull-850">
      <ul className="mx-auto max-w-6xl divide-y divide-hull-700">
        {items.map((n) => (
          <li key={n.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 px-4 py-2 text-sm">
            <span aria-hidden className={n.state === "ready" ? "text-kelp-300" : "text-flare-300"}>
              {n.state === "ready" ? "⬇" : "!"}
            </span>
            <span className="min-w-0 flex-1">
              {n.state === "ready" ? (
                <>
                  Your {PREPARED_KIND_LABELS[n.kind].toLowerCase()} for {n.siteName} is ready.
                </>
              ) : (
                <>
                  Your {PREPARED_KIND_LABELS[n.kind].toLowerCase()} for {n.siteName} could not be made: {n.error}
                </>
              )}
            </span>
            {n.downloadUrl && (
              <a
                href={n.downloadUrl}
                download={n.fileName}
                onClick={() => seen.mutate(n)}
                className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-3 font-semibold text-hull-950 no-underline"
              >
                Download
              </a>
            )}
            {n.state === "failed" && (
              <Link to={`${filesHref(n.siteId)}#prepared-files`} className="inline-flex min-h-11 items-center">
                See it and try again
              </Link>
            )}
            <button
              type="button"
              className="min-h-11 rounded-md px-3 ring-1 ring-hull-600 hover:bg-hull-700"
              onClick={() => seen.mutate(n)}
              aria-label={`Dismiss the notice about ${n.fileName}`}
            >
              Dismiss
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
}
