import { useState, type FormEvent, type ReactNode } from "react";
import { TextField } from "../../../components/field";
import { thermalScanBody } from "../../../schemas/readings";
import { useRecordThermal } from "../api";
import { fieldErrors, numOrNull, toIso } from "../format";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  saveErrors,
  type TargetOption,
} from "./form-bits";

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
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [queued, setQueued] = useState(false);
  const [componentId, setComponentId] = useState(defaultComponentId ?? options[0]?.componentId ?? "");
  const target = options.find((o) => o.componentId === componentId);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const componentId = String(f.get("componentId") ?? "");
    const body = {
      componentTempC: numOrNull(f.get("componentTempC")),
      similarTempC: numOrNull(f.get("similarTempC")),
      ambientTempC: numOrNull(f.get("ambientTempC")),
      loadPercent: numOrNull(f.get("loadPercent")),
      loadAmps: numOrNull(f.get("loadAmps")),
      photoId: String(f.get("photoId") ?? "").trim() || null,
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = thermalScanBody.safeParse(body);
    setMessage(null);
    if (!parsed.success || !componentId) {
      setErrors({
        ...(parsed.success ? {} : fieldErrors(parsed.error.issues)),
        ...(componentId ? {} : { componentId: "Choose the component" }),
      });
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    save.mutate(
      {
        componentId,
        label: options.find((o) => o.componentId === componentId)?.designation ?? "component",
        ...parsed.data,
      },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : `Level ${r.data.judgement.level}: ${r.data.judgement.action}.`);
        },
        onError: (err) => {
          const s = saveErrors(err);
          setErrors(s.fields);
          setMessage(s.message);
        },
      },
    );
  }

  return (
    <div className="space-y-3">
      <FormShell
        title="Record a thermal scan"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save scan"
      >
        <div
          className="contents"
          onChange={(e) => {
            const t: EventTarget = e.target;
            if (t instanceof HTMLSelectElement && t.name === "componentId") setComponentId(t.value);
          }}
        >
          <ComponentSelect options={options} defaultValue={defaultComponentId} error={errors.componentId} />
        </div>
        <NumberField label="Component temperature (°C)" name="componentTempC" required error={errors.componentTempC} />
        <NumberField label="Similar component, similar load (°C)" name="similarTempC" error={errors.similarTempC} />
        <NumberField label="Ambient air (°C)" name="ambientTempC" error={errors.ambientTempC} />
        <NumberField label="Load (% of rating)" name="loadPercent" error={errors.loadPercent} />
        <NumberField label="Load (A)" name="loadAmps" error={errors.loadAmps} />
        {photoPicker && target && photoPicker(target, errors.photoId)}
        <TextField label="Camera" name="instrument" />
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" className="sm:col-span-2" />
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
