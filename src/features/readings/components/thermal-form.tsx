import { useMemo, useState, type ReactNode } from "react";
import { z } from "zod";
import { TextField } from "../../../components/field";
import {
  blankAsNull,
  fieldError,
  formMessage,
  localDateTime,
  numberText,
  showSaveError,
  useSchemaForm,
} from "../../../lib/form";
import { thermalScanBody } from "../../../schemas/readings";
import { useRecordThermal } from "../api";
import { localNow } from "../format";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  type TargetOption,
  useFreshWhen,
} from "./form-bits";

/** The scan and the component it is taken on (a path parameter, so the form alone asks for it). */
const thermalBody = thermalScanBody.and(
  z.object({ componentId: z.string().min(1, { message: "Choose the component" }) }),
);

/** The form's text → the request body; thermalScanBody (shared with the server) validates it. */
const thermalForm = z
  .object({
    componentId: z.string(),
    componentTempC: numberText,
    similarTempC: numberText,
    ambientTempC: numberText,
    loadPercent: numberText,
    loadAmps: numberText,
    photoId: blankAsNull,
    instrument: z.string(),
    notes: z.string(),
    measuredAt: localDateTime,
  })
  .transform((v) => v as z.input<typeof thermalBody>)
  .pipe(thermalBody);
type ThermalFormValues = z.input<typeof thermalForm>;

export function ThermalForm({
  siteId,
  options,
  defaultComponentId,
  photoPicker,
}: {
  siteId: string;
  options: TargetOption[];
  defaultComponentId?: string;
  /**
   * The page's picker of the chosen component's thermal images (radio inputs named "photoId"); the
   * photos feature draws it, this form only reads the value.
   */
  photoPicker?: (target: TargetOption, error?: string) => ReactNode;
}) {
  const save = useRecordThermal(siteId);
  const defaults = useMemo<ThermalFormValues>(
    () => ({
      componentId: defaultComponentId ?? options[0]?.componentId ?? "",
      componentTempC: "",
      similarTempC: "",
      ambientTempC: "",
      loadPercent: "",
      loadAmps: "",
      photoId: "",
      instrument: "",
      notes: "",
      measuredAt: localNow(),
    }),
    [defaultComponentId, options],
  );
  const form = useSchemaForm(thermalForm, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const [saved, setSaved] = useState<string | null>(null);
  const [queued, setQueued] = useState(false);
  const componentId = form.watch("componentId");
  const target = options.find((o) => o.componentId === componentId);
  const e = (name: keyof ThermalFormValues) => fieldError(errors, name);

  const submit = form.handleSubmit(({ componentId, ...body }) =>
    save
      .mutateAsync({
        componentId,
        label: options.find((o) => o.componentId === componentId)?.designation ?? "component",
        ...body,
      })
      .then(
        (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : `Level ${r.data.judgement.level}: ${r.data.judgement.action}.`);
        },
        (err) => showSaveError(form, err),
      ),
  );
  const componentField = form.register("componentId", {
    // Another component's images: the picker starts again at "None".
    onChange: () => form.setValue("photoId", ""),
  });

  return (
    <div className="space-y-3">
      <FormShell
        title="Record a thermal scan"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save scan"
      >
        <ComponentSelect options={options} {...componentField} error={e("componentId")} />
        <NumberField
          label="Component temperature (°C)"
          {...form.register("componentTempC")}
          required
          error={e("componentTempC")}
        />
        <NumberField
          label="Similar component, similar load (°C)"
          {...form.register("similarTempC")}
          error={e("similarTempC")}
        />
        <NumberField label="Ambient air (°C)" {...form.register("ambientTempC")} error={e("ambientTempC")} />
        <NumberField label="Load (% of rating)" {...form.register("loadPercent")} error={e("loadPercent")} />
        <NumberField label="Load (A)" {...form.register("loadAmps")} error={e("loadAmps")} />
        {photoPicker && target && (
          // The picker's radios are the photos feature's own inputs: their choice is copied into the form.
          <div
            key={target.componentId}
            className="contents"
            onChange={(ev) => {
              const t: EventTarget = ev.target;
              if (t instanceof HTMLInputElement && t.name === "photoId") form.setValue("photoId", t.value);
            }}
          >
            {photoPicker(target, e("photoId"))}
          </div>
        )}
        <TextField label="Camera" {...form.register("instrument")} error={e("instrument")} />
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
      </FormShell>
      {queued && <KeptOnPhone what="Thermal scan" />}
      {saved && (
        <p role="status" className="rounded-md bg-hull-800 p-3">
          Saved. {saved}
        </p>
      )}
    </div>
  );
}
