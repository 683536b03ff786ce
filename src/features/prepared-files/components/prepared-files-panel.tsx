import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { PREPARED_KIND_LABELS, type PreparedKind } from "../../../schemas/prepared-files";
import { usePrepareFile, usePreparedFiles } from "../api";
import { PreparedFileRow } from "./prepared-file-row";

const SPREADSHEETS: PreparedKind[] = ["inventory_csv", "defects_csv", "parts_csv"];

/**
 * The person's prepared files on a site, newest first, with the spreadsheets they can ask for.
 * Each is made by the background worker; this list follows its progress and offers the download.
 */
export function PreparedFilesPanel({ siteId }: { siteId: string }) {
  const list = usePreparedFiles(siteId);
  const prepare = usePrepareFile(siteId);
  return (
    <section
      id="prepared-files"
      aria-labelledby="prepared-files-title"
      className="space-y-4 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 id="prepared-files-title" className="text-xl font-bold">
        Prepared files
      </h2>
      <p className="text-sm text-mist">
        Large files are made in the background: carry on working, and Tideline shows a notice when each is ready
        (reports also come by e-mail).
        {list.data && ` Each file is kept for ${list.data.retentionHours} hours after it is made, then removed.`}
      </p>
      <div className="space-y-2">
        <p className="text-sm font-semibold text-mist">Whole-site spreadsheets (CSV)</p>
        <div className="flex flex-wrap gap-2">
          {SPREADSHEETS.map((kind) => (
            <Button
              key={kind}
              tone="quiet"
              disabled={prepare.isPending}
              onClick={() => prepare.mutate({ kind, params: kind === "parts_csv" ? { status: "all" } : {} })}
            >
              Prepare: {PREPARED_KIND_LABELS[kind].replace(" (CSV)", "")}
            </Button>
          ))}
        </div>
      </div>
      {prepare.isError && <ErrorPanel error={prepare.error} />}
      {list.isPending && <Loading what="Loading your prepared files" />}
      {(list.isLoadingError || serverRefused(list.error)) && <ErrorPanel error={list.error} />}
      {list.data && list.data.files.length === 0 && <p className="text-mist">You have no prepared files here yet.</p>}
      {list.data && list.data.files.length > 0 && (
        <ul className="space-y-2" aria-label="Your prepared files">
          {list.data.files.map((f) => (
            <PreparedFileRow key={f.id} file={f} />
          ))}
        </ul>
      )}
    </section>
  );
}
