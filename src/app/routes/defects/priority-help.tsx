import { Link } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { paths } from "../../../config/paths";
import { PRIORITY_FORMULA_TEXT } from "../../../domain/priority";
import { DEFECT_SEVERITIES, DEFECT_SEVERITY_DEFINITIONS, DEFECT_SEVERITY_LABELS } from "../../../domain/vocab";
import { useSiteContext } from "../sites/site-layout";

/** Renders the formula text of src/domain/priority.ts: "**bold**" lines and "- " bullets. */
function FormulaText() {
  const blocks = PRIORITY_FORMULA_TEXT.split("\n\n");
  return (
    <>
      {blocks.map((b, i) => {
        const lines = b.split("\n");
        if (lines.every((l) => l.startsWith("- ")))
          return (
            <ul key={i} className="list-disc space-y-1 pl-6">
              {lines.map((l) => (
                <li key={l}>{l.slice(2)}</li>
              ))}
            </ul>
          );
        return lines.map((l) =>
          l.startsWith("**") ? (
            <h2 key={l} className="text-lg font-bold">
              {l.replace(/\*\*/g, "")}
            </h2>
          ) : (
            <p key={l}>{l}</p>
          ),
        );
      })}
    </>
  );
}

export default function PriorityHelpPage() {
  const { site } = useSiteContext();
  return (
    <article className="max-w-3xl space-y-4">
      <p className="text-sm">
        <Link className="underline" to={paths.defects.href(site.id)}>
          ← Defect register
        </Link>
      </p>
      <h1 className="text-2xl font-bold">How priority works</h1>
      <p className="text-mist">
        Every defect gets a priority score from the same formula; the register and the repair plan list the highest
        first. Each defect's page shows its own terms under “Why it ranks here”.
      </p>
      <FormulaText />
      <h2 className="text-lg font-bold">The severity scale</h2>
      <dl className="space-y-2">
        {DEFECT_SEVERITIES.map((s) => (
          <div key={s}>
            <dt className="font-semibold">{DEFECT_SEVERITY_LABELS[s]}</dt>
            <dd className="text-mist">{DEFECT_SEVERITY_DEFINITIONS[s]}</dd>
          </div>
        ))}
      </dl>
      <h2 className="text-lg font-bold">Curator's order</h2>
      <p>
        The curator can place a defect just before or just after another one, with a reason; the placing and its reason
        are kept on the defect's page, with who set it and when. A defect is placed against one that sits in its own
        score's place (placings do not chain).
      </p>
      <SafetyNotice />
    </article>
  );
}
