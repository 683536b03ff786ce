import { Link, useParams } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useBoardReadings } from "../../../features/readings/api";
import { ContactHistory } from "../../../features/readings/components/contact-history";
import { BoardDryOut } from "../../../features/readings/components/dry-out-section";
import { ListedOf } from "../../../features/readings/components/listed-of";
import { GroundCheckHistory } from "../../../features/readings/components/ground-check-history";
import { InsulationHistory } from "../../../features/readings/components/insulation-history";
import { LatestGroundCheck } from "../../../features/readings/components/latest-ground-check";
import { RecordPanel } from "../../../features/readings/components/record-panel";
import { PhotoPicker, PhotoThumb, usePhotoMap } from "../../../features/photos/components/photo-picker";
import { ThermalHistory } from "../../../features/readings/components/thermal-history";
import { GroundHuntLog } from "../../../features/readings/components/ground-hunt-log";
import { PhaseComparisonList } from "../../../features/readings/components/phase-comparison-list";
import { StepTestHistory } from "../../../features/readings/components/step-test-history";
import { TripTestHistory } from "../../../features/readings/components/trip-test-history";
import { TRIP_TESTABLE_KINDS } from "../../../domain/trip-test";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function BoardReadingsPage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const readings = useBoardReadings(site.id, boardId);
  const thermalPhotos = usePhotoMap(
    site.id,
    (readings.data?.thermal ?? []).flatMap((s) => (s.photoId ? [s.photoId] : [])),
  );
  if (readings.isPending) return <Loading what="Loading the board's readings" />;
  if (readings.isLoadingError || serverRefused(readings.error)) return <ErrorPanel error={readings.error} />;
  const {
    board,
    positions,
    insulation,
    contacts,
    thermal,
    groundChecks,
    tripTests,
    stepTests,
    groundHunts,
    phaseComparisons,
    totals,
    dryOutSeries,
    componentsWithReadings,
  } = readings.data;
  const withComponent = positions.filter((p) => p.componentId);
  const option = (p: (typeof positions)[number]) => ({
    componentId: p.componentId!,
    positionId: p.positionId,
    designation: p.designation,
    circuit: p.circuit,
  });
  const options = withComponent.map(option);
  const breakerOptions = withComponent
    .filter((p) => (TRIP_TESTABLE_KINDS as readonly string[]).includes(p.kind))
    .map(option);
  // A ground hunt opens what feeds out of the board: breakers, switches, fuses (else any position).
  const feederKinds: readonly string[] = [...TRIP_TESTABLE_KINDS, "switch", "enclosed_switch", "fuse"];
  const feederPositions = positions.filter((p) => feederKinds.includes(p.kind));
  const feeders = (feederPositions.length ? feederPositions : positions).map((p) => ({
    positionId: p.positionId,
    designation: p.designation,
    circuit: p.circuit,
  }));
  const elsewhere = "each component's page has all of its own, and the condition survey report every one";
  return (
    <div className="space-y-6">
      <p>
        <Link to={paths.readings.href(site.id)} className="inline-flex min-h-11 items-center">
          ← All boards
        </Link>
      </p>
      <h1 className="text-2xl font-bold">Readings · {board.name}</h1>
      <SafetyNotice />
      <LatestGroundCheck siteId={site.id} boardId={boardId} caution={false} />
      {can(role, "readings.record") && (
        <RecordPanel
          siteId={site.id}
          boardId={boardId}
          lineVolts={board.nominalVolts}
          options={options}
          breakerOptions={breakerOptions}
          feeders={feeders}
          hunts={groundHunts}
          comparisons={phaseComparisons}
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
      <section aria-labelledby="dry-out-title" className="space-y-2">
        <h2 id="dry-out-title" className="text-xl font-bold">
          Dry-out
        </h2>
        <BoardDryOut siteId={site.id} boardId={boardId} series={dryOutSeries} listed={insulation} />
      </section>
      {componentsWithReadings.length > 0 && (
        <nav aria-label="Components with readings" className="flex flex-wrap gap-2 text-sm">
          <span className="self-center text-mist">Per component:</span>
          {componentsWithReadings.map(({ componentId: id, designation }) => (
            <Link
              key={id}
              to={paths.readingsComponent.href(site.id, id)}
              className="inline-flex min-h-11 items-center rounded-md bg-hull-800 px-3 font-mono ring-1 ring-hull-600"
            >
              {designation}
            </Link>
          ))}
        </nav>
      )}
      <section aria-labelledby="ins-title" className="space-y-2">
        <h2 id="ins-title" className="text-xl font-bold">
          Insulation readings
        </h2>
        <ListedOf listed={insulation.length} total={totals.insulation} where={elsewhere} />
        <InsulationHistory readings={insulation} />
      </section>
      <section aria-labelledby="phase-title" className="space-y-2">
        <h2 id="phase-title" className="text-xl font-bold">
          Phase comparison
        </h2>
        <PhaseComparisonList comparisons={phaseComparisons} />
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
      <section aria-labelledby="trip-title" className="space-y-2">
        <h2 id="trip-title" className="text-xl font-bold">
          Trip tests
        </h2>
        <ListedOf listed={tripTests.length} total={totals.tripTests} where={elsewhere} />
        <TripTestHistory tests={tripTests} />
      </section>
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
      <section aria-labelledby="gl-title" className="space-y-2">
        <h2 id="gl-title" className="text-xl font-bold">
          Ground-lamp checks
        </h2>
        <ListedOf
          listed={groundChecks.length}
          total={totals.groundChecks}
          where="the condition survey report has every one"
        />
        <GroundCheckHistory checks={groundChecks} />
      </section>
      <section aria-labelledby="hunt-title" className="space-y-2">
        <h2 id="hunt-title" className="text-xl font-bold">
          Ground hunts
        </h2>
        {groundHunts.length === 0 ? (
          <p className="text-mist">No ground hunts logged yet.</p>
        ) : (
          groundHunts.map((h) => <GroundHuntLog key={h.hunt} hunt={h} />)
        )}
      </section>
    </div>
  );
}
