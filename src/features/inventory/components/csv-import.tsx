import { useState } from "react";
import { useDropzone } from "react-dropzone";
import { Button } from "../../../components/button";
import { TextArea } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { CSV_IMPORT_COLUMNS, importResponse, type ImportResponse } from "../../../schemas/inventory";
import { inventoryCsvHref, useImportInventory } from "../api";
import { ImportPlan, ImportSummary } from "./import-plan";

/**
 * The spreadsheet round trip: export, edit in any spreadsheet, check, apply. A chosen file is
 * sent as its bytes, so the server reads its encoding (UTF-8, UTF-16, Windows-1252…) and
 * separator and says which it used; the plan shows every row as new / changes (old → new) /
 * unchanged / needs fixing before anything is written, and applying sends the plan's digest
 * so a plan that changed meanwhile is shown again instead of written.
 */
export function CsvImport({ siteId }: { siteId: string }) {
  const [source, setSource] = useState<{ file: File } | { text: string }>({ text: "" });
  const [preview, setPreview] = useState<ImportResponse | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const m = useImportInventory(siteId);
  const body = "file" in source ? source.file : source.text;
  const empty = "file" in source ? false : !source.text.trim();
  const reset = () => {
    setPreview(null);
    setNotice(null);
    m.reset();
  };
  const drop = useDropzone({
    multiple: false,
    accept: { "text/csv": [".csv"], "text/plain": [".txt", ".tsv"], "text/tab-separated-values": [".tsv"] },
    onDrop: (files) => {
      if (!files[0]) return;
      setSource({ file: files[0] });
      reset();
    },
  });
  const check = () => {
    setNotice(null);
    m.mutate({ csv: body, mode: "preview" }, { onSuccess: setPreview });
  };
  const commit = () =>
    m.mutate(
      { csv: body, mode: "commit", expect: preview?.summary.planDigest },
      {
        onSuccess: setPreview,
        onError: (e) => {
          // 409 import_changed: someone changed the inventory since the check; show the new plan.
          // 400 import_invalid: a row went bad meanwhile; its plan comes with the answer too.
          const fresh =
            e instanceof ApiError && (e.code === "import_changed" || e.code === "import_invalid")
              ? importResponse.safeParse(e.detail)
              : null;
          if (fresh?.success) {
            setPreview(fresh.data);
            setNotice(e.message);
          }
        },
      },
    );
  const s = preview?.summary;
  const committed = s?.committed;
  const err = m.error instanceof ApiError && !notice ? m.error : null;
  const toDo = s ? s.created + s.changed : 0;
  return (
    <div className="space-y-4">
      <ol className="max-w-3xl list-decimal space-y-1 pl-5 text-sm text-mist">
        <li>
          <a href={inventoryCsvHref(siteId)} download className="underline">
            Export the current inventory
          </a>{" "}
          and open it in any spreadsheet program.
        </li>
        <li>
          Edit nameplates, designations, sections and grid places; add rows for new positions. Leave{" "}
          <span className="font-mono">position_id</span> and <span className="font-mono">row_version</span> as they are:
          they tie each row to its position.
        </li>
        <li>
          Save it as CSV (any encoding, commas, semicolons or tabs) and check it here. Nothing is written until you
          apply it.
        </li>
      </ol>
      <div
        {...drop.getRootProps()}
        className={`rounded-lg border-2 border-dashed p-6 text-center ${drop.isDragActive ? "border-brass-300 bg-hull-800" : "border-hull-500"}`}
      >
        <input {...drop.getInputProps()} aria-label="Choose a CSV file" />
        <p className="font-semibold">
          {"file" in source ? `Chosen: ${source.file.name}` : "Drop the inventory spreadsheet here (saved as CSV)"}
        </p>
        <Button tone="quiet" className="mt-2" onClick={drop.open}>
          Choose a file
        </Button>
      </div>
      <TextArea
        label="…or paste the CSV"
        rows={6}
        className="[&_textarea]:font-mono"
        value={"text" in source ? source.text : ""}
        onChange={(e) => {
          setSource({ text: e.target.value });
          reset();
        }}
        hint={
          <>
            Columns (any order, header row first): <span className="font-mono">{CSV_IMPORT_COLUMNS.join(", ")}</span>.
            Required: board, designation, kind, grid_row, grid_col.
          </>
        }
      />
      <div className="flex flex-wrap gap-2">
        <Button onClick={check} disabled={empty || m.isPending}>
          Check the file
        </Button>
      </div>
      {err && (
        <div role="alert" className="rounded-md border border-flare-400 bg-flare-700/30 p-3 text-sm">
          <p className="font-semibold">{err.message}</p>
          {err.code !== "import_invalid" && Object.keys(err.fields).length > 0 && (
            <ul className="mt-1 list-disc pl-5 font-mono">
              {Object.entries(err.fields)
                .slice(0, 20)
                .map(([k, v]) => (
                  <li key={k}>
                    {k}: {v}
                  </li>
                ))}
            </ul>
          )}
        </div>
      )}
      {notice && (
        <p role="alert" className="rounded-md border border-brass-400 bg-hull-800 p-3 text-sm">
          {notice}
        </p>
      )}
      {preview && s && (
        <section aria-labelledby="preview-title" className="space-y-3">
          <h2 id="preview-title" className="text-lg font-bold">
            {committed ? "Applied" : "What the import will do — nothing has been written yet"}
          </h2>
          <ImportSummary preview={preview} />
          {!committed && (
            <div className="flex flex-wrap items-center gap-3">
              <Button onClick={commit} disabled={s.failed > 0 || toDo === 0 || m.isPending}>
                {toDo === 0 ? "Nothing to apply" : `Apply: ${s.created} new, ${s.changed} changed`}
              </Button>
              {s.failed > 0 && (
                <p className="text-sm text-mist">
                  Fix the rows marked "needs fixing" in the file first: the import writes all rows or none.
                </p>
              )}
            </div>
          )}
          <ImportPlan preview={preview} />
        </section>
      )}
    </div>
  );
}
