import { useEffect, useMemo } from "react";

/** A finished PDF: open it, or save it under the server's file name. */
export function SaveLink({ blob, filename }: { blob: Blob; filename: string }) {
  const href = useMemo(() => URL.createObjectURL(blob), [blob]);
  useEffect(() => () => URL.revokeObjectURL(href), [href]);
  return (
    <div className="flex flex-wrap items-center gap-3 rounded-md bg-hull-800 p-3 ring-1 ring-kelp-700">
      <span className="text-kelp-300">Ready: {(blob.size / 1_048_576).toFixed(1)} MB</span>
      <a
        href={href}
        download={filename}
        className="inline-flex min-h-11 items-center rounded-md bg-brass-400 px-4 font-semibold text-hull-950 no-underline hover:bg-brass-300"
      >
        Save the PDF
      </a>
      <a href={href} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center underline">
        Open it in a new tab
      </a>
    </div>
  );
}
