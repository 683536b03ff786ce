import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { WATER_TYPE_LABELS, WATER_TYPES, type WaterType } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useFloodEventMutations } from "../api";
import type { FloodEvent } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";

interface Draft {
  occurredOn: string;
  waterType: WaterType;
  maxDepthM: string;
  hoursSubmerged: string;
  notes: string;
}
const LABELS = {
  occurredOn: "Date",
  waterType: "Water",
  maxDepthM: "Max depth (m)",
  hoursSubmerged: "Hours submerged",
  notes: "Notes",
};
const toDraft = (e?: FloodEvent | null): Draft => ({
  occurredOn: e?.occurredOn ?? "",
  waterType: e?.waterType ?? "salt",
  maxDepthM: e?.maxDepthM?.toString() ?? "",
  hoursSubmerged: e?.hoursSubmerged?.toString() ?? "",
  notes: e?.notes ?? "",
});
const numOrNull = (s: string) => (s.trim() === "" ? null : Number(s));

/** Records (or corrects) the site's flood: the water type drives every recommendation. */
export function FloodEventForm({
  siteId,
  event,
  onDone,
}: {
  siteId: string;
  event?: FloodEvent | null;
  onDone?: () => void;
}) {
  const [base, setBase] = useState<FloodEvent | null>(event ?? null);
  const [d, setD] = useState<Draft>(toDraft(event));
  const m = useFloodEventMutations(siteId);
  const active = base ? m.update : m.create;
  const conflict = conflictRecord<FloodEvent>(m.update.error);
  const fields = active.error instanceof ApiError ? active.error.fields : {};
  const set = (k: keyof Draft) => (e: { target: { value: string } }) => setD({ ...d, [k]: e.target.value });

  function save(version?: number) {
    const body = {
      occurredOn: d.occurredOn,
      waterType: d.waterType,
      maxDepthM: numOrNull(d.maxDepthM),
      hoursSubmerged: numOrNull(d.hoursSubmerged),
      notes: d.notes,
    };
    if (base)
      m.update.mutate(
        { id: base.id, version: version ?? base.version, ...body },
        {
          onSuccess: (r) => {
            setBase(r);
            onDone?.();
          },
        },
      );
    else
      m.create.mutate(body, {
        onSuccess: (r) => {
          setBase(r);
          onDone?.();
        },
      });
  }
  const submit = (e: FormEvent) => {
    e.preventDefault();
    save();
  };

  return (
    <form
      onSubmit={submit}
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2"
      aria-label="Flood event"
    >
      <TextField
        label="Date of the flood"
        type="date"
        required
        value={d.occurredOn}
        onChange={set("occurredOn")}
        error={fields.occurredOn}
      />
      <SelectField
        label="Water"
        value={d.waterType}
        onChange={set("waterType")}
        error={fields.waterType}
        hint="Salt, brackish and sewage water leave corrosive, conductive residue."
      >
        {WATER_TYPES.map((w) => (
          <option key={w} value={w}>
            {WATER_TYPE_LABELS[w]}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Deepest water (m)"
        inputMode="decimal"
        value={d.maxDepthM}
        onChange={set("maxDepthM")}
        error={fields.maxDepthM}
      />
      <TextField
        label="Hours submerged"
        inputMode="decimal"
        value={d.hoursSubmerged}
        onChange={set("hoursSubmerged")}
        error={fields.hoursSubmerged}
      />
      <TextArea className="sm:col-span-2" label="Notes" value={d.notes} onChange={set("notes")} error={fields.notes} />
      {conflict && base && (
        <div className="sm:col-span-2">
          <ConflictNotice
            base={base}
            current={conflict}
            labels={LABELS}
            busy={m.update.isPending}
            onUseTheirs={() => {
              setBase(conflict);
              setD(toDraft(conflict));
              m.update.reset();
            }}
            onApplyMine={() => {
              setBase(conflict);
              save(conflict.version);
            }}
          />
        </div>
      )}
      {active.isError && !conflict && (
        <p role="alert" className="text-sm text-flare-300 sm:col-span-2">
          {active.error.message}
        </p>
      )}
      {active.isSuccess && (
        <p role="status" className="text-sm text-kelp-300 sm:col-span-2">
          Flood event saved.
        </p>
      )}
      <div className="sm:col-span-2">
        <Button type="submit" disabled={active.isPending}>
          {base ? "Save changes" : "Record the flood"}
        </Button>
      </div>
    </form>
  );
}
