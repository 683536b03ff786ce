import { useState } from "react";
import type { ImportAction, ImportResponse, ImportRow } from "../../../schemas/inventory";

/** Tideline's marks for what an import does with a row; the word is always beside the mark. */
const ACTION: Record<ImportAction, { mark: string; word: string; tone: string }> = {
  problem: { mark: "!", word: "needs fixing", tone: "text-flare-300 ring-flare-400" },
  create: { mark: "+", word: "new position", tone: "text-kelp-300 ring-kelp-400" },
  update: { mark: "Δ", word: "changes", tone: "text-brass-300 ring-brass-400" },
  unchanged: { mark: "=", word: "unchanged", tone: "text-mist ring-hull-600" },
};
const ORDER: ImportAction[] = ["problem", "update", "create", "unchanged"];

const ENCODING_HOW = {
  byte_order_mark: "by its byte-order mark",
  valid_utf8: "every byte is valid UTF-8",
  detected: "detected from its bytes",
  sent_as_text: "pasted as text",
} as const;
const SEPARATOR = { ",": "commas", ";": "semicolons", "\t": "tabs", "|": "vertical bars" } as Record<string, string>;

export function ImportSummary({ preview }: { preview: ImportResponse }) {
  const s = preview.summary;
  return (
    <div
      role="status"
      data-testid="import-summary"
      className="space-y-1 rounded-md bg-hull-800 p-3 text-sm ring-1 ring-hull-600"
    >
      <p>
        Read as <strong>{s.encoding.name}</strong> ({ENCODING_HOW[s.encoding.how]}
        {s.encoding.confidence !== null && `, ${s.encoding.confidence} % sure`}), cells separated by{" "}
        <strong>{SEPARATOR[s.separator] ?? s.separator}</strong>.
      </p>
      <p className={s.failed ? "text-flare-300" : "text-kelp-300"}>
        {s.rows} rows: {s.created} new, {s.changed} changed, {s.unchanged} unchanged, {s.failed} with problems.
      </p>
      {s.shown !== undefined && s.shown < s.rows && (
        <p>
          Listed below: {s.shown} of the {s.rows} rows (problems first, then changes, new and unchanged rows). The
          counts above and applying cover every row.
        </p>
      )}
      {s.boardsToCreate.length > 0 && <p>New boards: {s.boardsToCreate.join(", ")}.</p>}
      {s.sectionsToCreate.length > 0 && <p>New sections: {s.sectionsToCreate.join(", ")}.</p>}
      {s.ignoredColumns.length > 0 && <p>Columns Tideline does not know, ignored: {s.ignoredColumns.join(", ")}.</p>}
    </div>
  );
}

function RowTitle({ r }: { r: ImportRow }) {
  const board = r.cells.board ?? "";
  const designation = r.cells.designation ?? "";
  const a = ACTION[r.action];
  return (
    <p className="flex flex-wrap items-center gap-2">
      <span className="font-mono text-xs text-mist">line {r.line}</span>
      <span className="font-mono font-semibold">{designation || "—"}</span>
      <span className="text-mist">{board}</span>
      <span className={`ml-auto inline-flex items-center gap-1 rounded px-2 text-xs font-semibold ring-1 ${a.tone}`}>
        <span aria-hidden="true">{a.mark}</span> {a.word}
      </span>
    </p>
  );
}

/** One row: its problems, its changes (old → new), and what the file changes that an import does not apply. */
function PlanRow({ r }: { r: ImportRow }) {
  const errors = Object.entries(r.errors);
  return (
    <li
      data-testid={`import-line-${r.line}`}
      className={`space-y-1 rounded-md p-3 ring-1 ${r.action === "problem" ? "bg-flare-700/25 ring-flare-400" : "bg-hull-900 ring-hull-700"}`}
    >
      <RowTitle r={r} />
      {errors.length > 0 && (
        <ul className="text-sm text-flare-300">
          {errors.map(([f, msg]) => (
            <li key={f}>
              <span className="font-mono">{f}</span>: {msg}
              {r.cells[f] !== undefined && r.cells[f] !== "" && (
                <span className="text-mist">
                  {" "}
                  (the file has <span className="font-mono">{r.cells[f]}</span>)
                </span>
              )}
            </li>
          ))}
        </ul>
      )}
      {r.changes.length > 0 && (
        <dl className="grid grid-cols-[max-content_1fr] gap-x-3 text-sm">
          {r.changes.map((c) => (
            <div key={c.column} className="contents">
              <dt className="font-mono text-mist">{c.column}</dt>
              <dd className="break-words">
                <del className="text-mist">{c.from || "(empty)"}</del> <span aria-hidden="true">→</span>
                <span className="sr-only">becomes</span>{" "}
                <ins className="no-underline font-semibold">{c.to || "(empty)"}</ins>
              </dd>
            </div>
          ))}
        </dl>
      )}
      {r.ignored.length > 0 && (
        <ul className="text-sm text-mist">
          {r.ignored.map((g) => (
            <li key={g.column}>
              Not applied: <span className="font-mono">{g.column}</span> {g.from || "(empty)"} → {g.to || "(empty)"}.{" "}
              {g.why}.
            </li>
          ))}
        </ul>
      )}
    </li>
  );
}

/** The plan, problems first; unchanged rows are counted and shown on request. */
export function ImportPlan({ preview }: { preview: ImportResponse }) {
  const [showUnchanged, setShowUnchanged] = useState(false);
  const rows = [...preview.rows].sort((a, b) => ORDER.indexOf(a.action) - ORDER.indexOf(b.action) || a.line - b.line);
  const shown = rows.filter((r) => showUnchanged || r.action !== "unchanged");
  const unchanged = preview.summary.unchanged;
  return (
    <div className="space-y-2">
      <ol className="space-y-2" aria-label="Rows of the file and what the import does with each">
        {shown.map((r) => (
          <PlanRow key={r.line} r={r} />
        ))}
      </ol>
      {unchanged > 0 && (
        <button
          type="button"
          className="min-h-11 underline"
          aria-expanded={showUnchanged}
          onClick={() => setShowUnchanged((v) => !v)}
        >
          {showUnchanged ? "Hide" : "Show"} the {unchanged} unchanged row{unchanged === 1 ? "" : "s"}
        </button>
      )}
    </div>
  );
}
