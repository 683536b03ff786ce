import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { PART_STATUS_LABELS, type PartStatus } from "../../../domain/vocab";
import { blankAsNull, fieldError, formMessage, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { statusBody, type LineDetail, type StatusBody } from "../../../schemas/parts";
import { useMoveStatus } from "../api";
import { defaultFittedHeritage } from "../../../domain/part-workflow";
import { localDay } from "../../../lib/clock";

const today = () => localDay(new Date());

/**
 * The form's text → the status body; statusBody (the server's own schema) validates it. The purchase
 * goes with "acquired" only where its fields are shown; a blank cost then means "already recorded"
 * when the line has an acquisition, and is the schema's "Enter an amount" when it has none.
 */
const statusForm = (version: number, needsPurchase: boolean, hasAcquisition: boolean) =>
  z
    .object({
      to: z.string(),
      note: z.string(),
      reason: z.string(),
      heritageAfter: z.string(),
      acquisition: z.object({ cost: numberText, acquiredOn: z.string(), qty: numberText, leadId: blankAsNull }),
    })
    .transform(({ to, note, reason, heritageAfter, acquisition: a }) => {
      if (to === "cancelled") return { to, version, reason } as StatusBody;
      if (to === "fitted") return { to, version, note, heritageAfter } as StatusBody;
      if (to === "acquired" && needsPurchase && (a.cost !== null || !hasAcquisition))
        return { to, version, note, acquisition: { ...a, qty: a.qty ?? 1 } } as StatusBody;
      return { to, version, note } as StatusBody;
    })
    .pipe(statusBody);

/** Moves the line on; receiving and fitting also update the components and defects it is for. */
export function StatusForm({ siteId, detail }: { siteId: string; detail: LineDetail }) {
  const [note, setNote] = useState<string | null>(null);
  if (!detail.nextStatuses.length) return null;
  // A new version (a move, or someone else's) starts the form again from the stored line.
  return <StatusFields key={detail.line.version} siteId={siteId} detail={detail} note={note} setNote={setNote} />;
}

function StatusFields({
  siteId,
  detail,
  note,
  setNote,
}: {
  siteId: string;
  detail: LineDetail;
  note: string | null;
  setNote: (m: string | null) => void;
}) {
  const { line, nextStatuses, leads, acquisitions } = detail;
  const move = useMoveStatus(siteId, line.id);
  const fittedDefault = defaultFittedHeritage(line);
  const needsPurchase = line.status !== "received";
  const schema = useMemo(
    () => statusForm(line.version, needsPurchase, acquisitions.length > 0),
    [line.version, needsPurchase, acquisitions.length],
  );
  const form = useSchemaForm(schema, {
    to: "",
    note: "",
    reason: "",
    heritageAfter: fittedDefault,
    acquisition: { cost: "", acquiredOn: today(), qty: String(line.qty || 1), leadId: "" },
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const to = form.watch("to") as PartStatus | "";
  const submit = form.handleSubmit((body) =>
    move.mutateAsync(body).then(
      () => setNote(`Moved to ${PART_STATUS_LABELS[body.to].toLowerCase()}.`),
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    ),
  );
  const message = formMessage(formState.errors) ?? note;
  return (
    <form
      onSubmit={(ev) => {
        setNote(null);
        void submit(ev);
      }}
      noValidate
      className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
      aria-labelledby="move-title"
    >
      <h2 id="move-title" className="text-lg font-bold">
        Move this line on
      </h2>
      <SelectField label="New status" {...register("to")} error={e("to")}>
        <option value="">Choose…</option>
        {nextStatuses.map((s) => (
          <option key={s} value={s}>
            {PART_STATUS_LABELS[s]}
          </option>
        ))}
      </SelectField>
      {to === "acquired" && needsPurchase && (
        <div className="grid gap-3 sm:grid-cols-2">
          <MoneyField
            label="Cost"
            {...register("acquisition.cost")}
            required={!acquisitions.length}
            error={e("acquisition.cost")}
          />
          <TextField
            label="Acquired on"
            {...register("acquisition.acquiredOn")}
            type="date"
            required
            error={e("acquisition.acquiredOn")}
          />
          <TextField
            label="Quantity"
            {...register("acquisition.qty")}
            type="number"
            min={1}
            error={e("acquisition.qty")}
          />
          <SelectField label="From lead" {...register("acquisition.leadId")} error={e("acquisition.leadId")}>
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
              <input type="radio" {...register("heritageAfter")} value={v} className="h-5 w-5 shrink-0" /> {label}
            </label>
          ))}
          {e("heritageAfter") && <p className="text-sm text-flare-300">{e("heritageAfter")}</p>}
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
        <TextField label="Why is it cancelled?" {...register("reason")} required error={e("reason")} />
      ) : to ? (
        <TextField
          label={to === "received" ? "Inspection on arrival" : "Note"}
          {...register("note")}
          error={e("note")}
        />
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
