import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { FLOOD_GUIDANCE_PROVENANCE } from "../../../domain/flood-guidance";
import { WATER_TYPE_LABELS } from "../../../domain/vocab";
import { useFloodEvents } from "../../../features/inventory/api";
import { FloodEventForm } from "../../../features/inventory/components/flood-event-form";
import { can } from "../../../domain/permissions";
import { useSiteContext } from "../sites/site-layout";

export default function FloodEventsPage() {
  const { site, role } = useSiteContext();
  const q = useFloodEvents(site.id);
  if (q.isPending) return <Loading />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const [latest, ...older] = q.data;
  return (
    <div className="max-w-3xl space-y-4">
      <h1 className="text-2xl font-bold">Flood record</h1>
      <p className="text-mist">
        What the water was and how long it stood drives every recommended disposition. The newest event is the one used.
      </p>
      {can(role, "inventory.curate") ? (
        <>
          <h2 className="text-lg font-bold">{latest ? "Current flood event" : "Record the flood"}</h2>
          <FloodEventForm key={latest?.id ?? "new"} siteId={site.id} event={latest} />
          {latest && (
            <details className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">
              <summary className="min-h-8 cursor-pointer font-semibold">Record another (later) flood event</summary>
              <div className="mt-3">
                <FloodEventForm siteId={site.id} />
              </div>
            </details>
          )}
        </>
      ) : latest ? (
        <p>
          {latest.occurredOn}: {WATER_TYPE_LABELS[latest.waterType]}
          {latest.maxDepthM != null && `, up to ${latest.maxDepthM} m`}
          {latest.hoursSubmerged != null && `, ${latest.hoursSubmerged} h`}.
        </p>
      ) : (
        <p className="text-fog">No flood event recorded yet.</p>
      )}
      <p className="text-xs text-fog">Where the recommendations come from: {FLOOD_GUIDANCE_PROVENANCE}</p>
      {older.length > 0 && (
        <ul className="space-y-1 text-sm text-mist">
          {older.map((e) => (
            <li key={e.id}>
              {e.occurredOn}: {WATER_TYPE_LABELS[e.waterType]}
              {e.notes && ` — ${e.notes}`}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
