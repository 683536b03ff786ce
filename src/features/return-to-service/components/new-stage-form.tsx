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
import type { RtsBoardView } from "../../../schemas/return-to-service";
import { ApiError } from "../../../lib/api-client";
import { useRtsAction } from "../api";

const input = "mt-1 w-full min-h-11 rounded-md bg-hull-900 px-2 ring-1 ring-hull-600";

/** The curator adds a stage; its hold points come from the site's template. */
export function NewStageForm({ siteId, view }: { siteId: string; view: RtsBoardView }) {
  const act = useRtsAction(siteId);
  const [open, setOpen] = useState(false);
  const [name, setName] = useState("");
  const [sectionIds, setSections] = useState<string[]>([]);
  const [positions, setPositions] = useState("");
  const [supply, setSupply] = useState<Supply>("temporary_fused");
  const [device, setDevice] = useState("Fused disconnect");
  const [rating, setRating] = useState("20");
  const [limit, setLimit] = useState("30");
  const [voltageStep, setVoltageStep] = useState<VoltageStep>("full");
  const [volts, setVolts] = useState(String(view.board.nominalVolts));
  const [qp, setQp] = useState(view.qualifiedPersons.find((q) => q.current)?.userId ?? "");
  const [dependsOnId, setDependsOn] = useState("");
  const [watchHours, setWatch] = useState("24");
  const [every, setEvery] = useState("4");
  if (!open) return <Button onClick={() => setOpen(true)}>Add a stage</Button>;
  const designations = positions.split(/[\s,]+/).filter(Boolean);
  const unknown = designations.filter(
    (d) => !view.positions.some((p) => p.designation.toLowerCase() === d.toLowerCase()),
  );
  const submit = () => {
    const positionIds = designations.flatMap((d) =>
      view.positions.filter((p) => p.designation.toLowerCase() === d.toLowerCase()).map((p) => p.id),
    );
    act.mutate(
      {
        method: "POST",
        path: `/boards/${view.board.id}/return-to-service/stages`,
        body: {
          name,
          sectionIds,
          positionIds,
          supply,
          protectionDevice: device,
          protectionRatingA: rating ? Number(rating) : null,
          protectionLimitA: limit ? Number(limit) : null,
          voltageStep,
          stepVolts: volts ? Number(volts) : null,
          qualifiedPersonId: qp || null,
          dependsOnId: dependsOnId || null,
          watchHours: Number(watchHours),
          checkEveryHours: Number(every),
        },
      },
      {
        onSuccess: () => {
          setOpen(false);
          setName("");
          setSections([]);
          setPositions("");
        },
      },
    );
  };
  const err = act.error instanceof ApiError ? act.error : null;
  return (
    <form
      className="space-y-3 rounded-lg bg-hull-800 p-4 ring-1 ring-hull-600"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
      aria-label="New stage"
    >
      <h2 className="text-lg font-bold">New stage</h2>
      <label className="block">
        Name
        <input className={input} value={name} onChange={(e) => setName(e.target.value)} required minLength={2} />
      </label>
      <fieldset>
        <legend>Sections it brings back</legend>
        <div className="flex flex-wrap gap-3">
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
        Or named circuits (designations, e.g. BT-1 1-3)
        <input className={input} value={positions} onChange={(e) => setPositions(e.target.value)} />
      </label>
      {unknown.length > 0 && <p className="text-sm text-rust-300">Not on this board: {unknown.join(", ")}</p>}
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
        <label className="block">
          Supply
          <select className={input} value={supply} onChange={(e) => setSupply(e.target.value as Supply)}>
            {SUPPLIES.map((s) => (
              <option key={s} value={s}>
                {SUPPLY_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Protection in front
          <input className={input} value={device} onChange={(e) => setDevice(e.target.value)} />
        </label>
        <label className="block">
          Protection rating (A)
          <input className={input} inputMode="decimal" value={rating} onChange={(e) => setRating(e.target.value)} />
        </label>
        <label className="block">
          Limit for this stage (A)
          <input className={input} inputMode="decimal" value={limit} onChange={(e) => setLimit(e.target.value)} />
        </label>
        <label className="block">
          Voltage step
          <select className={input} value={voltageStep} onChange={(e) => setVoltageStep(e.target.value as VoltageStep)}>
            {VOLTAGE_STEPS.map((s) => (
              <option key={s} value={s}>
                {VOLTAGE_STEP_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Volts
          <input className={input} inputMode="decimal" value={volts} onChange={(e) => setVolts(e.target.value)} />
        </label>
        <label className="block">
          Qualified person
          <select className={input} value={qp} onChange={(e) => setQp(e.target.value)}>
            <option value="">— none yet —</option>
            {view.qualifiedPersons.map((q) => (
              <option key={q.userId} value={q.userId}>
                {q.name}
                {q.current ? "" : " (expired)"}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          Depends on
          <select className={input} value={dependsOnId} onChange={(e) => setDependsOn(e.target.value)}>
            <option value="">— nothing —</option>
            {view.stages.map((s) => (
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
          A check every (h)
          <input className={input} inputMode="decimal" value={every} onChange={(e) => setEvery(e.target.value)} />
        </label>
      </div>
      {err && (
        <p role="alert" className="text-sm text-rust-300">
          {err.message}
        </p>
      )}
      <div className="flex gap-2">
        <Button type="submit" disabled={act.isPending}>
          Add the stage
        </Button>
        <Button tone="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
