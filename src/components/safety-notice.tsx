import { Link } from "react-router";
import { paths } from "../config/paths";

/**
 * Shown wherever readings are entered or judged and on every energisation step.
 * Tideline records and computes; it never says equipment is safe.
 */
export function SafetyNotice({ compact = false }: { compact?: boolean }) {
  return (
    <aside
      role="note"
      aria-label="Safety notice"
      className="rounded-md border-l-4 border-brass-400 bg-hull-800 p-3 text-sm text-chalk"
    >
      <p className="font-semibold text-brass-300">⚠ Flooded switchgear can kill: shock and arc flash.</p>
      {!compact && (
        <p className="mt-1 text-mist">
          Tideline records readings and computes against the criteria you set; it never declares equipment safe to
          energise. A qualified, licensed person decides. Establish an electrically safe work condition, keep to the
          approach boundaries and PPE of NFPA 70E, apply lockout/tagout and follow local codes.
        </p>
      )}
      <Link to={paths.safety.href()} className="mt-1 inline-block underline">
        Read the full safety notice
      </Link>
    </aside>
  );
}
