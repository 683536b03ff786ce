import { useState } from "react";
import { Button } from "../../../components/button";
import {
  SUPPLIES,
  SUPPLY_LABELS,
  VOLTAGE_STEPS,
  VOLTAGE_STEP_LABELS,
  type Supply,
  type VoltageStep,
} from "../../../domain/return-to-service";
import type { RtsBoardView, RtsStage } from "../../../schemas/return-to-service";
import { ApiError } from "../../../lib/api-client";
import { useRtsAction } from "../api";

const input = "mt-1 w-full min-h-11 rounded-md bg-hull-900 px-2 ring-1 ring-hull-600";
const num = (s: string) => (s.trim() === "" ? null : Number(s));

/**
 * The curator's form for a stage: what it brings back, the supply, the protection in front of
 * it and its limit, the voltage step, the qualified person, what it depends on and the watch.
 * New stages take their hold points from the site's template. While a stage is live its scope,
 * supply, protection and voltage stay as energised (the server refuses a change with 409).
 */
export function StageForm({
  siteId,
  view,
  stage,
  onDone,
}: {
  siteId: string;
  view: RtsBoardView;
  /** Absent: a new stage. */
  stage?: RtsStage;
  onDone: () => void;
}) {
  const act = useRtsAction(siteId);
  const [name, setName] = useState(stage?.name ?? "");
  const [sectionIds, setSections] = useState<string[]>(stage?.sections.map((s) => s.id) ?? []);
  const [positions, setPositions] = useState(stage?.positions.map((p) => p.designation).join(" ") ?? "");
  const [supply, setSupply] = useState<Supply>(stage?.supply ?? "temporary_fused");
  const [device, setDevice] = useState(stage?.protectionDevice ?? "Fused disconnect");
  const [rating, setRating] = useState(stage ? String(stage.protectionRatingA ?? "") : "20");
  const [limit, setLimit] = useState(stage ? String(stage.protectionLimitA ?? "") : "30");
  const [voltageStep, setVoltageStep] = useState<VoltageStep>(stage?.voltageStep ?? "full");
  const [volts, setVolts] = useState(stage ? String(stage.stepVolts ?? "") : String(view.board.nominalVolts));
  const [qp, setQp] = useState(stage ? (stage.qualifiedPerson?.userId ?? "") : "");
  const [dependsOnId, setDependsOn] = useState(stage?.dependsOnId ?? "");
  const [watchHours, setWatch] = useState(String(stage?.watchHours ?? 24));
  const [every, setEvery] = useState(String(stage?.checkEveryHours ?? 4));
  const [notes, setNotes] = useState(stage?.notes ?? "");
  const live = stage?.status === "energised";
  const designations = positions.split(/[\s,;]+/).filter(Boolean);
  const unknown = designations.filter(
    (d) => !view.positions.some((p) => p.designation.toLowerCase() === d.toLowerCase()),
  );
  // A stage may depend only on one that comes before it in the plan.
  const before = stage ? view.stages.filter((s) => s.sortOrder < stage.sortOrder) : view.stages;
  const submit = () => {
    const positionIds = designations.flatMap((d) =>
      view.positions.filter((p) => p.designation.toLowerCase() === d.toLowerCase()).map((p) => p.id),
    );
    const planFields = {
      name,
      qualifiedPersonId: qp || null,
      dependsOnId: dependsOnId || null,
      watchHours: Number(watchHours),
      checkEveryHours: Number(every),
      notes,
    };
    const scope = {
      sectionIds,
      positionIds,
      supply,
      protectionDevice: device,
      protectionRatingA: num(rating),
      protectionLimitA: num(limit),
      voltageStep,
      stepVolts: num(volts),
    };
    const req = stage
      ? {
          method: "PATCH" as const,
          path: `/return-to-service/stages/${stage.id}`,
          body: { ...planFields, ...(live ? {} : scope), version: stage.version },
        }
      : {
          method: "POST" as const,
          path: `/boards/${view.board.id}/return-to-service/stages`,
          body: { ...planFields, ...scope },
        };
    act.mutate(req, { onSuccess: onDone });
  };
  const err = act.error instanceof ApiError ? act.error : null;
  const fieldError = (f: string) => err?.fields?.[f];
  const label = stage ? `Edit stage ${stage.name}` : "New stage";
  return (
    <form
      className="space-y-3 rounded-lg bg-hull-800 p-4 ring-1 ring-hull-600"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
      aria-label={label}
    >
      <h3 className="text-lg font-bold">{stage ? `Edit “${stage.name}”` : "New stage"}</h3>
      {!stage && (
        <p className="text-sm text-mist">Its hold points are copied from the site's template; edit them afterwards.</p>
      )}
      {live && (
        <p className="text-sm text-brass-300">
          The stage is live: what it brings back, its supply, protection and voltage stay as energised. De-energise and
          start a new attempt to change them.
        </p>
      )}
      <label className="block">
        Stage name
        <input className={input} value={name} onChange={(e) => setName(e.target.value)} required minLength={2} />
      </label>
      <fieldset disabled={live}>
        <legend>Sections it brings back</legend>
        <div className="flex flex-wrap gap-x-4">
          {view.sections.map((s) => (
            <label key={s.id} className="inline-flex min-h-11 items-center gap-2">
              <input
                type="checkbox"
                checked={sectionIds.includes(s.id)}
                onChange={(e) =>
                  setSections(e.target.checked ? [...sectionIds, s.id] : sectionIds.filter((x) => x !== s.id))
                }
              />
              {s.name}
            </label>
          ))}
        </div>
      </fieldset>
      <label className="block">
        And named circuits (designations, e.g. a bus tie or a feeder)
        <input
          className={input}
          value={positions}
          disabled={live}
          onChange={(e) => setPositions(e.target.value)}
          list="rts-designations"
        />
        <datalist id="rts-designations">
          {view.positions.map((p) => (
            <option key={p.id} value={p.designation}>
              {p.circuit}
            </option>
          ))}
        </datalist>
      </label>
      {unknown.length > 0 && <p className="text-sm text-rust-300">Not on this board: {unknown.join(", ")}</p>}
      {fieldError("sectionIds") && <p className="text-sm text-rust-300">{fieldError("sectionIds")}</p>}
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <label className="block">
          Supply
          <select
            className={input}
            value={supply}
            disabled={live}
            onChange={(e) => setSupply(e.target.value as Supply)}
          >
            {SUPPLIES.map((s) => (
              <option key={s} value={s}>
                {SUPPLY_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Protection in front (device)
          <input className={input} value={device} disabled={live} onChange={(e) => setDevice(e.target.value)} />
        </label>
        <label className="block">
          Protection rating (A)
          <input
            className={input}
            inputMode="decimal"
            value={rating}
            disabled={live}
            onChange={(e) => setRating(e.target.value)}
          />
        </label>
        <label className="block">
          Protection limit for this stage (A)
          <input
            className={input}
            inputMode="decimal"
            value={limit}
            disabled={live}
            onChange={(e) => setLimit(e.target.value)}
          />
        </label>
        <label className="block">
          Voltage step
          <select
            className={input}
            value={voltageStep}
            disabled={live}
            onChange={(e) => setVoltageStep(e.target.value as VoltageStep)}
          >
            {VOLTAGE_STEPS.map((s) => (
              <option key={s} value={s}>
                {VOLTAGE_STEP_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Volts at this step
          <input
            className={input}
            inputMode="decimal"
            value={volts}
            disabled={live}
            onChange={(e) => setVolts(e.target.value)}
          />
        </label>
        <label className="block">
          Qualified person
          <select className={input} value={qp} onChange={(e) => setQp(e.target.value)}>
            <option value="">— none yet —</option>
            {view.qualifiedPersons.map((q) => (
              <option key={q.userId} value={q.userId}>
                {q.name}
                {q.current ? "" : " (qualification expired)"}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Depends on
          <select className={input} value={dependsOnId} onChange={(e) => setDependsOn(e.target.value)}>
            <option value="">— nothing —</option>
            {before.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Watch period (h)
          <input className={input} inputMode="decimal" value={watchHours} onChange={(e) => setWatch(e.target.value)} />
        </label>
        <label className="block">
          A watch check every (h)
          <input className={input} inputMode="decimal" value={every} onChange={(e) => setEvery(e.target.value)} />
        </label>
      </div>
      <label className="block">
        Notes
        <textarea
          className="mt-1 w-full rounded-md bg-hull-900 p-2 ring-1 ring-hull-600"
          value={notes}
          onChange={(e) => setNotes(e.target.value)}
        />
      </label>
      {err && (
        <p role="alert" className="text-sm text-rust-300">
          {err.message}
          {err.status === 409 && " Reload the stage to see it as it is now."}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={act.isPending || unknown.length > 0}>
          {stage ? "Save the stage" : "Add the stage"}
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** "Add a stage" for the curator; the form opens in place. */
export function NewStageForm({ siteId, view }: { siteId: string; view: RtsBoardView }) {
  const [open, setOpen] = useState(false);
  if (!open) return <Button onClick={() => setOpen(true)}>Add a stage</Button>;
  return <StageForm siteId={siteId} view={view} onDone={() => setOpen(false)} />;
}
