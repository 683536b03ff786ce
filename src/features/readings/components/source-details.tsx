import type { CriterionSourceDto } from "../../../schemas/readings";

/** The criterion's source, one click away: a short text and the table's name/number. */
export function SourceDetails({
  sources,
  label = "Source",
}: {
  sources: Array<{ title: string; source: CriterionSourceDto }>;
  label?: string;
}) {
  return (
    <details className="mt-1 text-sm">
      <summary className="inline-flex min-h-11 cursor-pointer items-center text-brass-300 underline">{label}</summary>
      <dl className="mt-1 space-y-2 rounded-md bg-hull-900 p-3 ring-1 ring-hull-700">
        {sources.map(({ title, source }) => (
          <div key={title}>
            <dt className="text-xs uppercase tracking-wide text-fog">{title}</dt>
            <dd>
              <span className="font-semibold">{source.table}</span>
              <span className="block text-mist">{source.text}</span>
            </dd>
          </div>
        ))}
      </dl>
    </details>
  );
}
