import { useMemo, useState } from "react";
import { z } from "zod";
import { TextField } from "../../../components/field";
import { fieldError, formMessage, localDateTime, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { TRIP_UNIT_LABELS, TRIP_UNITS } from "../../../domain/trip-test";
import { TRIP_TEST_LABELS, TRIP_TESTS, tripTestBody, type TripTest } from "../../../schemas/readings";
import { useRecordTripTest } from "../api";
import { localNow } from "../format";
import { ChoiceChips } from "./choice-chips";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  type TargetOption,
  useFreshWhen,
} from "./form-bits";
import { JudgedResult } from "./judged-result";
import { LiveWorkCaution } from "./live-work-caution";

/**
 * What the form asks beyond the body: the breaker (a path parameter), and a trip time unless the
 * breaker did not trip. Each is its own part of the intersection so its message shows with the rest.
 */
const breakerChosen = z.object({ componentId: z.string().min(1, { message: "Choose the breaker" }) });
const tripTimeGiven = z
  .object({ test: z.enum(TRIP_TESTS), noTrip: z.boolean(), tripSeconds: z.number().nullable() })
  .refine((b) => b.test !== "inverse_time" || b.noTrip || b.tripSeconds !== null, {
    message: "Give the trip time, or tick “Did not trip”",
    path: ["tripSeconds"],
  });

/** The form's text → the request body; tripTestBody (shared with the server) validates it. */
const tripTestForm = z
  .object({
    componentId: z.string(),
    test: z.enum(TRIP_TESTS),
    tripUnit: z.enum(TRIP_UNITS),
    adjustable: z.boolean(),
    noTrip: z.boolean(),
    pole: z.string(),
    ratingAmps: numberText,
    systemVolts: numberText,
    testAmps: numberText,
    tripSeconds: numberText,
    bandMinSeconds: numberText,
    bandMaxSeconds: numberText,
    settingAmps: numberText,
    publishedLowAmps: numberText,
    publishedHighAmps: numberText,
    pickupAmps: numberText,
    instrument: z.string(),
    notes: z.string(),
    measuredAt: localDateTime,
  })
  // Only the fields the chosen test shows are sent; the others keep their text for a change of mind.
  .transform((v) => {
    const inverse = v.test === "inverse_time";
    return {
      ...v,
      adjustable: v.tripUnit === "thermal_magnetic" && v.adjustable,
      testAmps: inverse ? v.testAmps : null,
      tripSeconds: inverse && !v.noTrip ? v.tripSeconds : null,
      bandMinSeconds: inverse ? v.bandMinSeconds : null,
      bandMaxSeconds: inverse ? v.bandMaxSeconds : null,
      settingAmps: !inverse ? v.settingAmps : null,
      publishedLowAmps: !inverse ? v.publishedLowAmps : null,
      publishedHighAmps: !inverse ? v.publishedHighAmps : null,
      pickupAmps: !inverse ? v.pickupAmps : null,
    } as z.input<typeof tripTestBody> & z.input<typeof breakerChosen> & z.input<typeof tripTimeGiven>;
  })
  .pipe(tripTestBody.and(breakerChosen).and(tripTimeGiven));
type TripTestFormValues = z.input<typeof tripTestForm>;

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
  const defaults = useMemo<TripTestFormValues>(
    () => ({
      componentId: defaultComponentId ?? options[0]?.componentId ?? "",
      test: "inverse_time",
      tripUnit: "thermal_magnetic",
      adjustable: false,
      noTrip: false,
      pole: "",
      ratingAmps: "",
      systemVolts: String(systemVolts),
      testAmps: "",
      tripSeconds: "",
      bandMinSeconds: "",
      bandMaxSeconds: "",
      settingAmps: "",
      publishedLowAmps: "",
      publishedHighAmps: "",
      pickupAmps: "",
      instrument: "",
      notes: "",
      measuredAt: localNow(),
    }),
    [defaultComponentId, options, systemVolts],
  );
  const form = useSchemaForm(tripTestForm, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const [test, unit, adjustable, noTrip] = form.watch(["test", "tripUnit", "adjustable", "noTrip"]);
  const [saved, setSaved] = useState<TripTest | null>(null);
  const [queued, setQueued] = useState(false);
  const e = (name: keyof TripTestFormValues) => fieldError(errors, name);

  const submit = form.handleSubmit(({ componentId, noTrip: _, ...body }) => {
    const breaker = options.find((o) => o.componentId === componentId);
    return save.mutateAsync({ componentId, label: breaker?.designation ?? "a breaker", ...body }).then(
      (r) => {
        setQueued(r.queued);
        setSaved(r.queued ? null : r.data);
      },
      (err) => showSaveError(form, err),
    );
  });

  const needsSetting = unit === "electronic" || adjustable;
  return (
    <div className="space-y-3">
      <FormShell
        title="Record a trip test"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save trip test"
        disabled={options.length === 0}
      >
        <LiveWorkCaution kind="trip" />
        {options.length === 0 && (
          <p className="text-mist sm:col-span-2">No breakers with a component recorded on this board yet.</p>
        )}
        <ComponentSelect options={options} label="Breaker" {...form.register("componentId")} error={e("componentId")} />
        <TextField label="Pole (optional)" {...form.register("pole")} hint="e.g. A, or 1" error={e("pole")} />
        <ChoiceChips
          legend="Test"
          name="test"
          options={TRIP_TESTS.map((t) => [t, TRIP_TEST_LABELS[t]] as const)}
          registered={form.register("test")}
        />
        <ChoiceChips
          legend="Trip unit"
          name="tripUnit"
          options={TRIP_UNITS.map((u) => [u, TRIP_UNIT_LABELS[u]] as const)}
          registered={form.register("tripUnit")}
        />
        {unit === "thermal_magnetic" && test === "instantaneous" && (
          <label className="flex min-h-12 items-center gap-3 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600 sm:col-span-2">
            <input type="checkbox" {...form.register("adjustable")} className="h-5 w-5" />
            Instantaneous trip is adjustable (has a dial)
          </label>
        )}
        <NumberField label="Breaker rating (A)" {...form.register("ratingAmps")} required error={e("ratingAmps")} />
        <NumberField label="System voltage (V)" {...form.register("systemVolts")} required error={e("systemVolts")} />
        {test === "inverse_time" ? (
          <>
            <NumberField
              label="Test current (A)"
              {...form.register("testAmps")}
              hint="Three times the rating: the 300 % band applies only near it"
              required
              error={e("testAmps")}
            />
            <NumberField
              label="Trip time (s)"
              {...form.register("tripSeconds")}
              error={e("tripSeconds")}
              hint={noTrip ? "Not used: the breaker did not trip" : undefined}
            />
            <label className="flex min-h-12 items-center gap-3 rounded-md bg-hull-900 px-3 ring-1 ring-hull-600 sm:col-span-2">
              <input type="checkbox" {...form.register("noTrip")} className="h-5 w-5" />
              Did not trip (test stopped)
            </label>
            <NumberField
              label="Manufacturer's band, fastest (s, optional)"
              {...form.register("bandMinSeconds")}
              hint="From the breaker's time-current curve at 300 %"
              error={e("bandMinSeconds")}
            />
            <NumberField
              label="Manufacturer's band, slowest (s, optional)"
              {...form.register("bandMaxSeconds")}
              hint="Without a band, a thermal-magnetic breaker up to 600 A is judged on the NETA table"
              error={e("bandMaxSeconds")}
            />
          </>
        ) : (
          <>
            {needsSetting ? (
              <NumberField
                label="Instantaneous setting (A)"
                {...form.register("settingAmps")}
                required
                error={e("settingAmps")}
              />
            ) : (
              <>
                <NumberField
                  label="Published pickup, low (A)"
                  {...form.register("publishedLowAmps")}
                  required
                  error={e("publishedLowAmps")}
                />
                <NumberField
                  label="Published pickup, high (A)"
                  {...form.register("publishedHighAmps")}
                  required
                  error={e("publishedHighAmps")}
                />
              </>
            )}
            <NumberField label="Pickup current (A)" {...form.register("pickupAmps")} required error={e("pickupAmps")} />
          </>
        )}
        <TextField label="Test set" {...form.register("instrument")} error={e("instrument")} />
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
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
