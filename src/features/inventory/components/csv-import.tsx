import Papa from "papaparse";
import { useMemo, useState } from "react";
import { useDropzone } from "react-dropzone";
import { Button } from "../../../components/button";
import { TextArea } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { CSV_IMPORT_COLUMNS, type ImportResponse } from "../../../schemas/inventory";
import { inventoryCsvHref, useImportInventory } from "../api";
import { ImportPreviewTable } from "./import-preview-table";

/** Reads the file in the browser only to show its cells; the server checks and writes. */
function parseCells(csv: string) {
  const r = Papa.parse<Record<string, string>>(csv, {
    header: true,
    skipEmptyLines: true,
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  return { headers: r.meta.fields ?? [], rows: r.data };
}

export function CsvImport({ siteId }: { siteId: string }) {
  const [csv, setCsv] = useState("");
  const [fileName, setFileName] = useState<string | null>(null);
  const [preview, setPreview] = useState<ImportResponse | null>(null);
  const m = useImportInventory(siteId);
  const cells = useMemo(() => (preview ? parseCells(csv) : null), [preview, csv]);
  const drop = useDropzone({
    multiple: false,
    accept: { "text/csv": [".csv"], "text/plain": [".txt"] },
    onDrop: async (files) => {
      const f = files[0];
      if (!f) return;
      setFileName(f.name);
      setCsv(await f.text());
      setPreview(null);
      m.reset();
    },
  });
  const check = () => m.mutate({ csv, mode: "preview" }, { onSuccess: setPreview });
  const commit = () => m.mutate({ csv, mode: "commit" }, { onSuccess: setPreview });
  const failed = preview?.summary.failed ?? 0;
  const committed = preview?.summary.committed;
  const err = m.error instanceof ApiError ? m.error : null;
  return (
    <div className="space-y-4">
      <div
        {...drop.getRootProps()}
        className={`rounded-lg border-2 border-dashed p-6 text-center ${drop.isDragActive ? "border-brass-300 bg-hull-800" : "border-hull-500"}`}
      >
        <input {...drop.getInputProps()} aria-label="Choose a CSV file" />
        <p className="font-semibold">
          {fileName ? `Chosen: ${fileName}` : "Drop the inventory spreadsheet here (saved as CSV)"}
        </p>
        <Button tone="quiet" className="mt-2" onClick={drop.open}>
          Choose a file
        </Button>
      </div>
      <TextArea
        label="…or paste the CSV"
        rows={6}
        className="[&_textarea]:font-mono"
        value={csv}
        onChange={(e) => {
          setCsv(e.target.value);
          setFileName(null);
          setPreview(null);
          m.reset();
        }}
        hint={
          <>
            Columns (any order, header row first): <span className="font-mono">{CSV_IMPORT_COLUMNS.join(", ")}</span>.
            Required: board, designation, kind, grid_row, grid_col.
          </>
        }
      />
      <div className="flex flex-wrap gap-2">
        <Button onClick={check} disabled={!csv.trim() || m.isPending}>
          Check the file
        </Button>
        <a
          href={inventoryCsvHref(siteId)}
          download
          className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold ring-1 ring-hull-600 no-underline"
        >
          Export the current inventory
        </a>
      </div>
      {err && (
        <div role="alert" className="rounded-md border border-flare-400 bg-flare-700/30 p-3 text-sm">
          <p className="font-semibold">{err.message}</p>
          {Object.keys(err.fields).length > 0 && (
            <ul className="mt-1 list-disc pl-5 font-mono">
              {Object.entries(err.fields)
                .slice(0, 20)
                .map(([k, v]) => (
                  <li key={k}>
                    line {k.replace(".", ", ")}: {v}
                  </li>
                ))}
            </ul>
          )}
        </div>
      )}
      {preview && cells && (
        <section aria-labelledby="preview-title" className="space-y-3">
          <h2 id="preview-title" className="text-lg font-bold">
            {committed ? "Imported" : "Preview — nothing has been written yet"}
          </h2>
          <p role="status" className={failed ? "text-flare-300" : "text-kelp-300"} data-testid="import-summary">
            {preview.summary.rows} rows: {preview.summary.ok} ready, {failed} with errors.
            {preview.summary.boardsToCreate.length > 0 && ` New boards: ${preview.summary.boardsToCreate.join(", ")}.`}
            {preview.summary.sectionsToCreate.length > 0 &&
              ` New sections: ${preview.summary.sectionsToCreate.join(", ")}.`}
            {preview.summary.ignoredColumns.length > 0 &&
              ` Ignored columns: ${preview.summary.ignoredColumns.join(", ")}.`}
          </p>
          <ImportPreviewTable rows={preview.rows} headers={cells.headers} cells={cells.rows} />
          {!committed && (
            <div className="flex flex-wrap items-center gap-3">
              <Button onClick={commit} disabled={failed > 0 || m.isPending}>
                Import all {preview.summary.ok} rows
              </Button>
              {failed > 0 && (
                <p className="text-sm text-mist">
                  Fix the highlighted rows in the file first: the import writes all rows or none.
                </p>
              )}
            </div>
          )}
        </section>
      )}
    </div>
  );
}
