import { useState, type FormEvent } from "react";
import { TextField } from "../../../components/field";
import { TRIP_UNIT_LABELS, TRIP_UNITS, type TripUnit } from "../../../domain/trip-test";
import { TRIP_TEST_LABELS, TRIP_TESTS, tripTestBody, type TripTest } from "../../../schemas/readings";
import { useRecordTripTest } from "../api";
import { fieldErrors, numOrNull, toIso } from "../format";
import { ChoiceChips } from "./choice-chips";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  saveErrors,
  type TargetOption,
} from "./form-bits";
import { JudgedResult } from "./judged-result";
import { LiveWorkCaution } from "./live-work-caution";

type Test = (typeof TRIP_TESTS)[number];

/**
 * A breaker's trip test by primary injection: the overload (inverse-time) trip at 300 % of the
 * rating or the instantaneous pickup. The server judges it (src/domain/trip-test.ts) against
 * the manufacturer's band when given, else the NETA tables; the result and its source show
 * here as soon as it is saved.
 */
export function TripTestForm({
  siteId,
  options,
  systemVolts,
  defaultComponentId,
}: {
  siteId: string;
  options: TargetOption[];
  systemVolts: number;
  defaultComponentId?: string;
}) {
  const save = useRecordTripTest(siteId);
  const [test, setTest] = useState<Test>("inverse_time");
  const [unit, setUnit] = useState<TripUnit>("thermal_magnetic");
  const [adjustable, setAdjustable] = useState(false);
  const [noTrip, setNoTrip] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<TripTest | null>(null);
  const [queued, setQueued] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const componentId = String(f.get("componentId") ?? "");
    const n = (k: string) => numOrNull(f.get(k));
    const inverse = test === "inverse_time";
    const body = {
      test,
      tripUnit: unit,
      adjustable: unit === "thermal_magnetic" && adjustable,
      pole: String(f.get("pole") ?? ""),
      ratingAmps: n("ratingAmps"),
      systemVolts: n("systemVolts"),
      testAmps: inverse ? n("testAmps") : null,
      tripSeconds: inverse && !noTrip ? n("tripSeconds") : null,
      bandMinSeconds: inverse ? n("bandMinSeconds") : null,
      bandMaxSeconds: inverse ? n("bandMaxSeconds") : null,
      settingAmps: !inverse ? n("settingAmps") : null,
      publishedLowAmps: !inverse ? n("publishedLowAmps") : null,
      publishedHighAmps: !inverse ? n("publishedHighAmps") : null,
      pickupAmps: !inverse ? n("pickupAmps") : null,
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = tripTestBody.safeParse(body);
    const more: Record<string, string> = {};
    if (!componentId) more.componentId = "Choose the breaker";
    if (inverse && !noTrip && body.tripSeconds === null)
      more.tripSeconds = "Give the trip time, or tick “Did not trip”";
    setMessage(null);
    if (!parsed.success || Object.keys(more).length) {
      setErrors({ ...(parsed.success ? {} : fieldErrors(parsed.error.issues)), ...more });
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    const breaker = options.find((o) => o.componentId === componentId);
    save.mutate(
      { componentId, label: breaker?.designation ?? "a breaker", ...parsed.data },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : r.data);
        },
        onError: (err) => {
          const s = saveErrors(err);
          setErrors(s.fields);
          setMessage(s.message);
        },
      },
    );
  }

  const needsSetting = unit === "electronic" || adjustable;
  return (
    <div className="space-y-3">
      <FormShell
        title="Record a trip test"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save trip test"
        disabled={options.length === 0}
      >
        <LiveWorkCaution kind="trip" />
        {options.length === 0 && (
          <p className="text-mist sm:col-span-2">No breakers with a component recorded on this board yet.</p>
        )}
        <ComponentSelect
          options={options}
          label="Breaker"
          defaultValue={defaultComponentId}
          error={errors.componentId}
        />
        <TextField label="Pole (optional)" name="pole" hint="e.g. A, or 1" error={errors.pole} />
        <ChoiceChips
          legend="Test"
          name="test"
          options={TRIP_TESTS.map((t) => [t, TRIP_TEST_LABELS[t]] as const)}
          value={test}
          onChange={setTest}
        />
        <ChoiceChips
          legend="Trip unit"
          name="tripUnit"
          options={TRIP_UNITS.map((u) => [u, TRIP_UNIT_LABELS[u]] as const)}
          value={unit}
          onChange={setUnit}
        />
        {unit === "thermal_magnetic" && test === "instantaneous" && (
          <label className="flex min-h-12 items-center gap-3 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600 sm:col-span-2">
            <input
              type="checkbox"
              checked={adjustable}
              onChange={(e) => setAdjustable(e.target.checked)}
              className="h-5 w-5"
            />
            Instantaneous trip is adjustable (has a dial)
          </label>
        )}
        <NumberField label="Breaker rating (A)" name="ratingAmps" required error={errors.ratingAmps} />
        <NumberField
          label="System voltage (V)"
          name="systemVolts"
          defaultValue={systemVolts}
          required
          error={errors.systemVolts}
        />
        {test === "inverse_time" ? (
          <>
            <NumberField
              label="Test current (A)"
              name="testAmps"
              hint="Three times the rating: the 300 % band applies only near it"
              required
              error={errors.testAmps}
            />
            <NumberField
              label="Trip time (s)"
              name="tripSeconds"
              error={errors.tripSeconds}
              hint={noTrip ? "Not used: the breaker did not trip" : undefined}
            />
            <label className="flex min-h-12 items-center gap-3 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600 sm:col-span-2">
              <input
                type="checkbox"
                checked={noTrip}
                onChange={(e) => setNoTrip(e.target.checked)}
                className="h-5 w-5"
              />
              Did not trip (test stopped)
            </label>
            <NumberField
              label="Manufacturer's band, fastest (s, optional)"
              name="bandMinSeconds"
              hint="From the breaker's time-current curve at 300 %"
              error={errors.bandMinSeconds}
            />
            <NumberField
              label="Manufacturer's band, slowest (s, optional)"
              name="bandMaxSeconds"
              hint="Without a band, a thermal-magnetic breaker up to 600 A is judged on the NETA table"
              error={errors.bandMaxSeconds}
            />
          </>
        ) : (
          <>
            {needsSetting ? (
              <NumberField label="Instantaneous setting (A)" name="settingAmps" required error={errors.settingAmps} />
            ) : (
              <>
                <NumberField
                  label="Published pickup, low (A)"
                  name="publishedLowAmps"
                  required
                  error={errors.publishedLowAmps}
                />
                <NumberField
                  label="Published pickup, high (A)"
                  name="publishedHighAmps"
                  required
                  error={errors.publishedHighAmps}
                />
              </>
            )}
            <NumberField label="Pickup current (A)" name="pickupAmps" required error={errors.pickupAmps} />
          </>
        )}
        <TextField label="Test set" name="instrument" />
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" className="sm:col-span-2" />
      </FormShell>
      {queued && <KeptOnPhone what="Trip test" />}
      {saved && (
        <JudgedResult
          live
          testId="trip-result"
          title={`Saved: ${TRIP_TEST_LABELS[saved.test]}, ${saved.designation ?? ""} — window ${saved.judgement.window}`}
          verdict={saved.judgement.verdict}
          lines={saved.judgement.reasons}
          sources={[{ title: "Band", source: saved.judgement.source }]}
        />
      )}
    </div>
  );
}
