import { Button } from "../../../components/button";
import type { UploadItem } from "../use-upload-queue";

const STATE_TEXT: Record<UploadItem["state"], string> = {
  queued: "Waiting",
  uploading: "Uploading",
  processing: "Processing on the server",
  done: "Done",
  failed: "Failed",
};
const STATE_MARK: Record<UploadItem["state"], string> = {
  queued: "…",
  uploading: "↑",
  processing: "⟳",
  done: "✓",
  failed: "✕",
};

/** One row per file: name, a labelled progress bar, the state in words (never colour alone). */
export function UploadList({ items, onRetry }: { items: UploadItem[]; onRetry: (key: string) => void }) {
  if (!items.length) return null;
  return (
    <ul aria-label="Uploads" className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700">
      {items.map((i) => {
        const pct = Math.round(i.progress * 100);
        return (
          <li
            key={i.key}
            className="flex flex-wrap items-center gap-3 p-3"
            data-testid="upload-row"
            data-state={i.state}
          >
            <span
              aria-hidden="true"
              className={`w-5 text-center font-bold ${i.state === "failed" ? "text-flare-300" : i.state === "done" ? "text-kelp-300" : "text-brass-300"}`}
            >
              {STATE_MARK[i.state]}
            </span>
            <span className="min-w-0 flex-1 truncate font-mono text-sm" title={i.file.name}>
              {i.file.name}
            </span>
            <progress
              className={`h-3 w-32 overflow-hidden rounded [&::-webkit-progress-bar]:bg-hull-700 ${i.state === "failed" ? "[&::-webkit-progress-value]:bg-flare-400" : "[&::-webkit-progress-value]:bg-brass-400"}`}
              max={100}
              value={i.state === "queued" || i.state === "failed" ? 0 : pct}
              aria-label={`Upload progress of ${i.file.name}`}
            />
            <span className="w-44 text-sm text-mist" role="status">
              {STATE_TEXT[i.state]}
              {i.state === "uploading" ? ` ${pct} %` : ""}
              {i.state === "done" && i.photo?.designation ? ` · ${i.photo.designation}` : ""}
            </span>
            {i.state === "failed" && (
              <div className="flex w-full items-center gap-3">
                <p className="flex-1 text-sm text-flare-300">{i.error}</p>
                {i.retryable !== false && (
                  <Button tone="quiet" onClick={() => onRetry(i.key)} aria-label={`Retry ${i.file.name}`}>
                    Retry
                  </Button>
                )}
              </div>
            )}
          </li>
        );
      })}
    </ul>
  );
}
