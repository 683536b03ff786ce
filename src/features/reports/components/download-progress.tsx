import type { Progress } from "../api";

/** Pages received of the pages the server announced; a live region so a screen reader hears it. */
export function DownloadProgress({ progress, label }: { progress: Progress; label: string }) {
  const { pages, totalPages, bytes } = progress;
  const mb = (bytes / 1_048_576).toFixed(1);
  return (
    <div className="space-y-1" aria-live="polite">
      {totalPages ? (
        <progress className="h-3 w-full accent-brass-400" max={totalPages} value={pages} aria-label={label} />
      ) : (
        <progress className="h-3 w-full accent-brass-400" aria-label={label} />
      )}
      <p className="text-sm text-mist">
        {totalPages ? `Page ${pages} of ${totalPages}` : "Preparing"} · {mb} MB received
      </p>
    </div>
  );
}
