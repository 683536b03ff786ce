import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { WithMessage } from "../../../components/field";
import { DEFECT_STATUSES, DEFECT_STATUS_LABELS, type DefectStatus } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { blankAsNull, fieldError, formMessage, useSchemaForm } from "../../../lib/form";
import { bulkBody, type DefectOptions } from "../../../schemas/defects";
import { useBulkDefects } from "../api";
import { memberLabel, repairCrew } from "../assignees";

const control = "mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk";

/** The chosen change → the bulk body; bulkBody (the server's own schema) validates it. */
const bulkForm = (ids: string[]) =>
  z
    .object({
      action: z.object({
        type: z.string(),
        assigneeId: blankAsNull,
        to: z.string(),
        reason: z.string(),
        dueOn: blankAsNull,
      }),
    })
    .transform(({ action: { type, assigneeId, to, reason, dueOn } }) => {
      const action =
        type === "assign" ? { type, assigneeId } : type === "status" ? { type, to, reason } : { type, dueOn };
      return { ids, action } as z.input<typeof bulkBody>;
    })
    .pipe(bulkBody);

/** The curator's bulk change of the selected defects: choose, then confirm once. */
export function BulkBar({
  siteId,
  ids,
  options,
  onDone,
}: {
  siteId: string;
  ids: string[];
  options?: DefectOptions;
  onDone: () => void;
}) {
  const schema = useMemo(() => bulkForm(ids), [ids]);
  const form = useSchemaForm(schema, {
    action: { type: "assign", assigneeId: "", to: "scheduled", reason: "", dueOn: "" },
  });
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: "assigneeId" | "to" | "reason" | "dueOn") => fieldError(errors, `action.${name}`);
  const [confirming, setConfirming] = useState(false);
  const bulk = useBulkDefects(siteId);
  const crew = repairCrew(options);
  const { type: kind, assigneeId: assignee, to, dueOn: due } = form.watch("action");

  const summary =
    kind === "assign"
      ? `assign to ${crew.find((c) => c.id === assignee)?.name ?? "nobody"}`
      : kind === "status"
        ? `move to “${DEFECT_STATUS_LABELS[to as DefectStatus]}”`
        : due
          ? `set due date ${due}`
          : "clear the due date";

  // Apply… checks the change first; the confirmation sends it. A refusal names each defect that cannot take it.
  const ask = form.handleSubmit(() => {
    bulk.reset();
    setConfirming(true);
  });
  const apply = form.handleSubmit((body) =>
    bulk.mutateAsync(body).then(
      () => {
        setConfirming(false);
        onDone();
      },
      () => setConfirming(false),
    ),
  );
  const refused = bulk.error
    ? {
        message: bulk.error instanceof ApiError ? bulk.error.message : "That did not work.",
        items: bulk.error instanceof ApiError ? Object.values(bulk.error.fields) : [],
      }
    : null;
  const message = formMessage(errors);

  return (
    <section
      aria-label="Change the selected defects"
      className="no-print rounded-lg bg-hull-850 p-3 ring-1 ring-brass-400"
    >
      <div className="flex flex-wrap items-end gap-3">
        <p className="min-h-11 self-center font-semibold">{ids.length} selected</p>
        <label className="text-sm font-semibold text-mist">
          Change
          <select className={control} {...register("action.type", { onChange: () => setConfirming(false) })}>
            <option value="assign">Assignee</option>
            <option value="status">Status</option>
            <option value="due">Due date</option>
          </select>
        </label>
        {kind === "assign" && (
          <WithMessage error={e("assigneeId")}>
            {(describedBy) => (
              <label className="text-sm font-semibold text-mist">
                Assign to
                <select className={control} {...register("action.assigneeId")} aria-describedby={describedBy}>
                  <option value="">Nobody</option>
                  {crew.map((c) => (
                    <option key={c.id} value={c.id}>
                      {memberLabel(c)}
                    </option>
                  ))}
                </select>
              </label>
            )}
          </WithMessage>
        )}
        {kind === "status" && (
          <>
            <WithMessage error={e("to")}>
              {(describedBy) => (
                <label className="text-sm font-semibold text-mist">
                  New status
                  <select className={control} {...register("action.to")} aria-describedby={describedBy}>
                    {DEFECT_STATUSES.map((s) => (
                      <option key={s} value={s}>
                        {DEFECT_STATUS_LABELS[s]}
                      </option>
                    ))}
                  </select>
                </label>
              )}
            </WithMessage>
            <WithMessage error={e("reason")}>
              {(describedBy) => (
                <label className="text-sm font-semibold text-mist">
                  Reason (deferring or accepting as is)
                  <input
                    className={`${control} w-64`}
                    {...register("action.reason")}
                    aria-invalid={!!e("reason")}
                    aria-describedby={describedBy}
                  />
                </label>
              )}
            </WithMessage>
          </>
        )}
        {kind === "due" && (
          <WithMessage error={e("dueOn")}>
            {(describedBy) => (
              <label className="text-sm font-semibold text-mist">
                Due on
                <input
                  type="date"
                  className={control}
                  {...register("action.dueOn")}
                  aria-invalid={!!e("dueOn")}
                  aria-describedby={describedBy}
                />
              </label>
            )}
          </WithMessage>
        )}
        {!confirming && <Button onClick={(ev) => void ask(ev)}>Apply…</Button>}
      </div>
      {confirming && (
        <div
          role="alertdialog"
          aria-label="Confirm the change"
          className="mt-3 flex flex-wrap items-center gap-3 rounded-md bg-hull-800 p-3"
        >
          <p>
            Change {ids.length} defect{ids.length === 1 ? "" : "s"}: {summary}? All of them change or none do.
          </p>
          <Button onClick={(ev) => void apply(ev)} disabled={bulk.isPending}>
            Yes, change {ids.length}
          </Button>
          <Button tone="quiet" onClick={() => setConfirming(false)}>
            Cancel
          </Button>
        </div>
      )}
      {message && (
        <p role="alert" className="mt-3 text-flare-300">
          {message}
        </p>
      )}
      {refused && (
        <div role="alert" className="mt-3 text-flare-300">
          <p>{refused.message}</p>
          <ul className="list-disc pl-5">
            {refused.items.map((m) => (
              <li key={m}>{m}</li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}
