import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { PART_STATUS_LABELS, type PartStatus } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { LineDetail, StatusBody } from "../../../schemas/parts";
import { useMoveStatus } from "../api";
import { defaultFittedHeritage } from "../../../domain/part-workflow";

const today = () => new Date().toISOString().slice(0, 10);

function bodyFor(to: PartStatus, version: number, f: FormData): StatusBody {
  const note = String(f.get("note") ?? "");
  if (to === "cancelled") return { to, version, reason: String(f.get("reason") ?? "") };
  if (to === "fitted")
    return { to, version, note, heritageAfter: f.get("heritageAfter") as "unchanged" | "period" | "modern" };
  if (to === "acquired" && f.get("cost") !== null)
    return {
      to,
      version,
      note,
      acquisition: {
        cost: Number(f.get("cost")),
        acquiredOn: String(f.get("acquiredOn")),
        qty: Number(f.get("qty") || 1),
        leadId: (f.get("leadId") as string) || null,
      },
    };
  return { to, version, note } as StatusBody;
}

/** Moves the line on; receiving and fitting also update the components and defects it is for. */
export function StatusForm({ siteId, detail }: { siteId: string; detail: LineDetail }) {
  const { line, nextStatuses, leads, acquisitions } = detail;
  const move = useMoveStatus(siteId, line.id);
  const [to, setTo] = useState<PartStatus | "">("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  if (!nextStatuses.length) return null;

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    if (!to) return;
    setErrors({});
    move.mutate(bodyFor(to, line.version, new FormData(e.currentTarget)), {
      onSuccess: () => {
        setTo("");
        setMessage(`Moved to ${PART_STATUS_LABELS[to].toLowerCase()}.`);
      },
      onError: (err) => {
        setMessage(err instanceof ApiError ? err.message : "That did not work.");
        if (err instanceof ApiError) setErrors(err.fields);
      },
    });
  }
  const fittedDefault = defaultFittedHeritage(line);
  const needsPurchase = to === "acquired" && line.status !== "received";
  return (
    <form
      onSubmit={submit}
      className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
      aria-labelledby="move-title"
    >
      <h2 id="move-title" className="text-lg font-bold">
        Move this line on
      </h2>
      <SelectField label="New status" value={to} onChange={(e) => setTo(e.target.value as PartStatus)}>
        <option value="">Choose…</option>
        {nextStatuses.map((s) => (
          <option key={s} value={s}>
            {PART_STATUS_LABELS[s]}
          </option>
        ))}
      </SelectField>
      {needsPurchase && (
        <div className="grid gap-3 sm:grid-cols-2">
          <MoneyField label="Cost" name="cost" required={!acquisitions.length} error={errors["acquisition.cost"]} />
          <TextField
            label="Acquired on"
            name="acquiredOn"
            type="date"
            defaultValue={today()}
            required
            error={errors["acquisition.acquiredOn"]}
          />
          <TextField label="Quantity" name="qty" type="number" min={1} defaultValue={line.qty || 1} />
          <SelectField label="From lead" name="leadId" defaultValue="">
            <option value="">No recorded lead</option>
            {leads.map((l) => (
              <option key={l.id} value={l.id}>
                {l.source}
              </option>
            ))}
          </SelectField>
        </div>
      )}
      {to === "fitted" && (
        <fieldset className="space-y-1">
          <legend className="text-sm font-semibold text-mist">What does the fitted part make of the component?</legend>
          {(
            [
              ["unchanged", "Heritage unchanged (a sub-part fitted into the existing component)"],
              ["period", "Period replacement (a whole component of the period, not the original)"],
              ["modern", "Modern replacement"],
            ] as const
          ).map(([v, label]) => (
            <label key={v} className="flex min-h-11 items-center gap-2">
              <input
                type="radio"
                name="heritageAfter"
                value={v}
                defaultChecked={v === fittedDefault}
                className="h-5 w-5 shrink-0"
              />{" "}
              {label}
            </label>
          ))}
          <p className="text-xs text-fog" data-testid="fitted-default-reason">
            {fittedDefault === "unchanged"
              ? `This line is for a part of the component (${line.need}), so its heritage stays as it is.`
              : "This line sources a whole component: once fitted it no longer counts as original fabric."}
          </p>
          <p className="text-xs text-fog">
            Each component this line is for is marked refitted; each linked defect moves to awaiting re-test. Re-test
            before energising — a qualified person decides.
          </p>
        </fieldset>
      )}
      {to === "received" && (
        <p className="text-sm text-mist">Each component this line is for will show custody “ready to refit”.</p>
      )}
      {to === "cancelled" ? (
        <TextField label="Why is it cancelled?" name="reason" required error={errors.reason} />
      ) : to ? (
        <TextField label={to === "received" ? "Inspection on arrival" : "Note"} name="note" error={errors.note} />
      ) : null}
      <div className="flex items-center gap-3">
        <Button type="submit" disabled={!to || move.isPending}>
          Save status
        </Button>
        {message && (
          <p role="status" className="text-mist">
            {message}
          </p>
        )}
      </div>
    </form>
  );
}
