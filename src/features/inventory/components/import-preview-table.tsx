import type { ImportRow } from "../contract";

/**
 * Row-by-row result of the server's check, over the cells as they are in the file.
 * Header is line 1, so the n-th data row is line n + 1 (files with line breaks inside
 * quoted cells may be off; the server's line numbers are the ones to trust).
 */
export function ImportPreviewTable({
  rows,
  headers,
  cells,
}: {
  rows: ImportRow[];
  headers: string[];
  cells: Array<Record<string, string>>;
}) {
  const cols = headers.slice(0, 12);
  return (
    <div className="max-h-[32rem] overflow-auto rounded-lg ring-1 ring-hull-700">
      <table className="w-full border-collapse text-sm">
        <caption className="sr-only">Rows of the file with the problems found on each</caption>
        <thead className="sticky top-0 bg-hull-800 text-left">
          <tr>
            <th scope="col" className="px-2 py-1">
              Line
            </th>
            <th scope="col" className="px-2 py-1">
              Result
            </th>
            {cols.map((h) => (
              <th key={h} scope="col" className="px-2 py-1 font-mono text-xs">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r, i) => {
            const raw = cells[r.line - 2] ?? cells[i] ?? {};
            const bad = Object.entries(r.errors);
            return (
              <tr
                key={r.line}
                data-testid={`import-line-${r.line}`}
                className={`border-t border-hull-700 ${r.ok ? "" : "bg-flare-700/25"}`}
              >
                <td className="px-2 py-1 font-mono">{r.line}</td>
                <td className="px-2 py-1">
                  {r.ok ? (
                    <span className="text-kelp-300">✓ ready</span>
                  ) : (
                    <ul className="text-flare-300">
                      {bad.map(([f, msg]) => (
                        <li key={f}>
                          <span className="font-mono">{f}</span>: {msg}
                        </li>
                      ))}
                    </ul>
                  )}
                </td>
                {cols.map((h) => (
                  <td
                    key={h}
                    className={`px-2 py-1 font-mono text-xs ${r.errors[h] ? "text-flare-300 underline decoration-wavy decoration-flare-400" : "text-mist"}`}
                    title={r.errors[h]}
                  >
                    {raw[h] ?? ""}
                    {r.errors[h] && <span className="sr-only"> (error: {r.errors[h]})</span>}
                  </td>
                ))}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
