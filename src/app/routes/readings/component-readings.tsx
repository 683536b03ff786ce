import { Link, useParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useComponentReadings } from "../../../features/readings/api";
import { ContactHistory } from "../../../features/readings/components/contact-history";
import { DryOutSection } from "../../../features/readings/components/dry-out-section";
import { InsulationHistory } from "../../../features/readings/components/insulation-history";
import { ListedOf } from "../../../features/readings/components/listed-of";
import { OverrideForm } from "../../../features/readings/components/override-form";
import { RecordPanel } from "../../../features/readings/components/record-panel";
import { PhotoPicker, PhotoThumb, usePhotoMap } from "../../../features/photos/components/photo-picker";
import { ThermalHistory } from "../../../features/readings/components/thermal-history";
import { StepTestHistory } from "../../../features/readings/components/step-test-history";
import { TripTestHistory } from "../../../features/readings/components/trip-test-history";
import { TRIP_TESTABLE_KINDS } from "../../../domain/trip-test";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function ComponentReadingsPage() {
  const { site, role } = useSiteContext();
  const { componentId = "" } = useParams();
  const q = useComponentReadings(site.id, componentId);
  const thermalPhotos = usePhotoMap(
    site.id,
    (q.data?.thermal ?? []).flatMap((s) => (s.photoId ? [s.photoId] : [])),
  );
  if (q.isPending) return <Loading what="Loading the component's readings" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const { component: c, override, insulation, contacts, thermal, tripTests, stepTests, totals } = q.data;
  const elsewhere = "the condition survey report has every one";
  const trippable = (TRIP_TESTABLE_KINDS as readonly string[]).includes(c.kind);
  return (
    <div className="space-y-6">
      <p>
        <Link to={paths.readingsBoard.href(site.id, c.boardId)} className="inline-flex min-h-11 items-center">
          ← {c.boardName}
        </Link>
      </p>
      <h1 className="text-2xl font-bold">
        <span className="font-mono">{c.designation}</span> · {c.circuit}
      </h1>
      <p className="text-mist">
        Rated {c.ratedVolts} V{override && ` · manufacturer's values in force (${override.source})`}
      </p>
      <SafetyNotice />
      {can(role, "readings.record") && (
        <RecordPanel
          siteId={site.id}
          boardId={c.boardId}
          lineVolts={c.ratedVolts}
          componentId={c.id}
          options={[{ componentId: c.id, positionId: c.positionId, designation: c.designation, circuit: c.circuit }]}
          kinds={["insulation", "step", "contact", ...(trippable ? (["trip"] as const) : []), "thermal"]}
          thermalPhotoPicker={(target, error) => (
            <PhotoPicker
              siteId={site.id}
              componentId={target.componentId}
              positionId={target.positionId}
              kind="thermal"
              name="photoId"
              legend="Thermal image (optional)"
              error={error}
            />
          )}
        />
      )}
      {can(role, "readings.criteria") && <OverrideForm siteId={site.id} componentId={c.id} current={override} />}
      <section aria-labelledby="dry-out-title" className="space-y-2">
        <h2 id="dry-out-title" className="text-xl font-bold">
          Dry-out
        </h2>
        <DryOutSection readings={insulation} />
      </section>
      <section aria-labelledby="ins-title" className="space-y-2">
        <h2 id="ins-title" className="text-xl font-bold">
          Insulation readings
        </h2>
        <ListedOf listed={insulation.length} total={totals.insulation} where={elsewhere} />
        <InsulationHistory readings={insulation} showTarget={false} />
      </section>
      <section aria-labelledby="step-title" className="space-y-2">
        <h2 id="step-title" className="text-xl font-bold">
          Step-voltage tests
        </h2>
        <ListedOf listed={stepTests.length} total={totals.stepTests} where={elsewhere} />
        <StepTestHistory tests={stepTests} />
      </section>
      <section aria-labelledby="con-title" className="space-y-2">
        <h2 id="con-title" className="text-xl font-bold">
          Contact resistance
        </h2>
        <ListedOf listed={contacts.length} total={totals.contacts} where={elsewhere} />
        <ContactHistory readings={contacts} />
      </section>
      {(trippable || tripTests.length > 0) && (
        <section aria-labelledby="trip-title" className="space-y-2">
          <h2 id="trip-title" className="text-xl font-bold">
            Trip tests
          </h2>
          <ListedOf listed={tripTests.length} total={totals.tripTests} where={elsewhere} />
          <TripTestHistory tests={tripTests} showTarget={false} />
        </section>
      )}
      <section aria-labelledby="th-title" className="space-y-2">
        <h2 id="th-title" className="text-xl font-bold">
          Thermal findings
        </h2>
        <ListedOf listed={thermal.length} total={totals.thermal} where={elsewhere} />
        <ThermalHistory
          scans={thermal}
          image={(photoId, scan) => {
            const p = thermalPhotos.get(photoId);
            return p ? <PhotoThumb siteId={site.id} photo={p} alt={`Thermal image of ${scan.designation}`} /> : null;
          }}
        />
      </section>
    </div>
  );
}
