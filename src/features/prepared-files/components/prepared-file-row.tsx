import { Button } from "../../../components/button";
import { ErrorPanel } from "../../../components/status";
import { PREPARED_KIND_LABELS, PREPARED_STATE_LABELS, type PreparedFile } from "../../../schemas/prepared-files";
import { inProgress, useMarkSeen, useRetryFile } from "../api";
import { stamp } from "../../../lib/clock";

const size = (n: number | null) =>
  n === null ? "" : n >= 1_048_576 ? `${(n / 1_048_576).toFixed(1)} MB` : `${Math.max(1, Math.round(n / 1024))} kB`;
const when = (iso: string | null) => stamp(iso, "");
const unit = (f: PreparedFile) => (f.kind === "survey_report" ? "positions" : "rows");

/** One prepared file: what it is, where it is in its making, and what the person can do with it. */
export function PreparedFileRow({ file }: { file: PreparedFile }) {
  const retry = useRetryFile();
  const seen = useMarkSeen();
  const busy = inProgress(file);
  return (
    <li className="space-y-2 rounded-md bg-hull-800 p-3 ring-1 ring-hull-600" data-testid="prepared-file">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p className="font-semibold">{PREPARED_KIND_LABELS[file.kind]}</p>
        <p className="text-sm text-mist">Asked for {when(file.createdAt)}</p>
      </div>
      <p
        className={file.state === "failed" ? "text-flare-300" : file.state === "ready" ? "text-kelp-300" : "text-chalk"}
      >
        <span className="font-semibold">{PREPARED_STATE_LABELS[file.state]}</span>
        {file.state === "ready" && ` · ${file.fileName} · ${size(file.sizeBytes)}`}
        {file.state === "ready" && file.expiresAt && ` · kept until ${when(file.expiresAt)}`}
      </p>
      {busy && (
        <div className="space-y-1">
          {file.progressTotal ? (
            <progress
              className="h-3 w-full accent-brass-400"
              max={file.progressTotal}
              value={file.progressDone}
              aria-label={`${PREPARED_KIND_LABELS[file.kind]}: progress`}
            />
          ) : (
            <progress
              className="h-3 w-full accent-brass-400"
              aria-label={`${PREPARED_KIND_LABELS[file.kind]}: progress`}
            />
          )}
          <p className="text-sm text-mist" aria-live="polite">
            {file.state === "queued"
              ? file.error
                ? file.error
                : "Waiting for the background worker…"
              : file.progressTotal
                ? `${file.progressDone} of ${file.progressTotal} ${unit(file)}`
                : "Starting…"}
          </p>
        </div>
      )}
      {file.state === "failed" && file.error && (
        <p className="text-sm">
          Reason: {file.error} (tried {file.attempts} time{file.attempts === 1 ? "" : "s"})
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        {file.downloadUrl && (
          <a
            href={file.downloadUrl}
            download={file.fileName}
            onClick={() => !file.seenAt && seen.mutate(file)}
            className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-4 font-semibold text-hull-950 no-underline hover:bg-brass-300"
          >
            Download
          </a>
        )}
        {(file.state === "failed" || file.state === "expired") && (
          <Button tone="quiet" onClick={() => retry.mutate(file)} disabled={retry.isPending}>
            {file.state === "failed" ? "Try again" : "Make it again"}
          </Button>
        )}
      </div>
      {retry.isError && <ErrorPanel error={retry.error} />}
    </li>
  );
}
