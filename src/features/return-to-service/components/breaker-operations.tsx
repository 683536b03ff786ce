import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { operationsStatus } from "../../../domain/breaker-operations";
import { can } from "../../../domain/permissions";
import { COMPONENT_KIND_LABELS, type Role } from "../../../domain/vocab";
import {
  blankAsNull,
  fieldError,
  formMessage,
  numberText,
  serverMessage,
  showSaveError,
  useSchemaForm,
} from "../../../lib/form";
import { budgetBody, operationBody, type RtsBoardView, type RtsBreaker } from "../../../schemas/return-to-service";
import { useMediaQuery } from "../../../lib/use-media-query";
import { useRtsAction, useRtsBoard } from "../api";
import { stamp as when } from "../../../lib/clock";

/** The stage a new operation most likely belongs to: the live one, else the next to come. */
const likelyStage = (view: RtsBoardView) =>
  view.stages.find((s) => s.status === "energised") ?? view.stages.find((s) => s.status !== "released") ?? null;

/**
 * The form's text → the request body; operationBody (the server's own schema) validates it, with
 * the breaker chosen (the request's path) beside it.
 */
const operationForm = z
  .object({ componentId: z.string(), operation: z.string(), stageId: blankAsNull, why: z.string() })
  .transform((v) => v as z.input<typeof operationBody> & { componentId: string })
  .pipe(operationBody.extend({ componentId: z.uuid({ message: "Choose the breaker" }) }));

/**
 * Records one open or close of a breaker: who (the person signed in), why, and during which
 * stage (or on its own). Before saving it says when this operation would pass the breaker's
 * budget and suggests feeding from the temporary supply instead; it never blocks.
 */
export function RecordOperation({
  siteId,
  view,
  breakers,
  onDone,
}: {
  siteId: string;
  view: RtsBoardView;
  breakers: RtsBreaker[];
  onDone?: () => void;
}) {
  const act = useRtsAction(siteId);
  const form = useSchemaForm(operationForm, {
    componentId: breakers.length === 1 ? breakers[0].componentId : "",
    operation: "close",
    stageId: likelyStage(view)?.id ?? "",
    why: "",
  });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const [saved, setSaved] = useState<string | null>(null);
  const componentId = form.watch("componentId");
  const b = breakers.find((x) => x.componentId === componentId);
  const next = b ? operationsStatus(b.status.used, b.budget, 1) : null;
  const submit = form.handleSubmit(({ componentId: id, ...body }) => {
    setSaved(null);
    const designation = breakers.find((x) => x.componentId === id)?.designation;
    return act.mutateAsync({ method: "POST", path: `/components/${id}/breaker-operations`, body }).then(
      (r) => {
        const st = (r as { status: { used: number; budget: number } }).status;
        setSaved(
          `Recorded: ${designation} ${body.operation === "close" ? "closed" : "opened"} (${st.used} of ${st.budget} used).`,
        );
        form.setValue("why", "");
        onDone?.();
      },
      (err: unknown) => showSaveError(form, err),
    );
  });
  const message = formMessage(formState.errors);
  return (
    <form
      className="space-y-2 rounded-md bg-hull-900 p-3"
      aria-label="Record a breaker operation"
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <div className="grid gap-2 sm:grid-cols-2">
        {breakers.length > 1 && (
          <SelectField label="Breaker" {...register("componentId")} required error={e("componentId")}>
            <option value="">— choose —</option>
            {breakers.map((x) => (
              <option key={x.componentId} value={x.componentId}>
                {x.designation} ({x.status.used} of {x.budget} used)
              </option>
            ))}
          </SelectField>
        )}
        <fieldset className="text-sm">
          <legend>
            Operation{" "}
            {e("operation") && (
              <span role="alert" className="text-rust-300">
                — {e("operation")}
              </span>
            )}
          </legend>
          <div className="mt-1 flex gap-2">
            {(["close", "open"] as const).map((o) => (
              <label key={o} className="inline-flex min-h-11 items-center gap-2 rounded-md px-3 ring-1 ring-hull-600">
                <input type="radio" {...register("operation")} value={o} />
                {o === "close" ? "Closed" : "Opened"}
              </label>
            ))}
          </div>
        </fieldset>
        <SelectField label="During stage" {...register("stageId")} error={e("stageId")}>
          <option value="">On its own (no stage)</option>
          {view.stages.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name}
            </option>
          ))}
        </SelectField>
        <TextField label="Why" {...register("why")} required error={e("why")} />
      </div>
      {next?.warning && (
        <p role="alert" className="rounded-md border border-brass-400 p-2 text-sm text-brass-300">
          ⚠ {b!.designation}: {next.warning} The budget warns; it does not stop you.
        </p>
      )}
      {message && (
        <p role="alert" className="text-sm text-rust-300">
          {message}
        </p>
      )}
      {saved && (
        <p role="status" className="text-sm">
          {saved}
        </p>
      )}
      <Button type="submit" disabled={formState.isSubmitting || !componentId}>
        Record the operation
      </Button>
    </form>
  );
}

/** The form's text → the request body; budgetBody (the server's own schema) validates it. */
const budgetForm = (version: number) =>
  z
    .object({ budget: numberText, reason: z.string() })
    .transform((v) => ({ ...v, version }) as z.input<typeof budgetBody>)
    .pipe(budgetBody);

/** The curator changes a breaker's budget (version-checked), with the reason. */
function BudgetEditor({ siteId, b, onDone }: { siteId: string; b: RtsBreaker; onDone: () => void }) {
  const act = useRtsAction(siteId);
  const schema = useMemo(() => budgetForm(b.budgetVersion), [b.budgetVersion]);
  const form = useSchemaForm(schema, { budget: String(b.budget), reason: "" });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "PUT", path: `/components/${b.componentId}/operations-budget`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <form
      className="flex flex-wrap items-start gap-2"
      aria-label={`Operations budget of ${b.designation}`}
      onSubmit={(ev) => void submit(ev)}
      noValidate
    >
      <TextField
        className="w-24"
        label="Budget"
        {...register("budget")}
        inputMode="numeric"
        required
        error={e("budget")}
      />
      <TextField className="flex-1" label="Reason" {...register("reason")} error={e("reason")} />
      <div className="flex gap-2 self-end">
        <Button type="submit" disabled={formState.isSubmitting}>
          Save
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
      {message && (
        <p role="alert" className="w-full text-sm text-rust-300">
          {message}
        </p>
      )}
    </form>
  );
}

function BreakerRow({ siteId, b, role }: { siteId: string; b: RtsBreaker; role: Role | "admin" }) {
  const [editing, setEditing] = useState(false);
  const warn = b.status.overBudget || b.status.remaining <= 0;
  return (
    <>
      <tr className={warn ? "text-rust-300" : ""} data-testid={`breaker-${b.designation}`}>
        <td className="p-1 font-mono">{b.designation}</td>
        <td className="p-1">
          {COMPONENT_KIND_LABELS[b.kind]}
          {b.year ? `, ${b.year}` : ", year unknown"}
        </td>
        <td className="p-1">{b.status.used}</td>
        <td className="p-1">{b.budget}</td>
        <td className="p-1">{warn ? `${b.status.remaining} ⚠` : b.status.remaining}</td>
        <td className="p-1 text-mist">{b.budgetBasis}</td>
        <td className="p-1">
          {can(role, "rts.set_budget") && !editing && (
            <Button tone="quiet" onClick={() => setEditing(true)} aria-label={`Change the budget of ${b.designation}`}>
              Change
            </Button>
          )}
        </td>
      </tr>
      {editing && (
        <tr>
          <td colSpan={7} className="p-1">
            <BudgetEditor siteId={siteId} b={b} onDone={() => setEditing(false)} />
          </td>
        </tr>
      )}
    </>
  );
}

/**
 * One breaker on a phone (below 48rem, where the seven columns would scroll sideways): position and kind, then used,
 * budget and left in one line, the basis, and the curator's change of budget in place.
 */
function BreakerItem({ siteId, b, role }: { siteId: string; b: RtsBreaker; role: Role | "admin" }) {
  const [editing, setEditing] = useState(false);
  const warn = b.status.overBudget || b.status.remaining <= 0;
  return (
    <li className="rounded-md bg-hull-900 p-3 ring-1 ring-hull-700" data-testid={`breaker-${b.designation}`}>
      <div className="flex items-start justify-between gap-2">
        <p>
          <span className="font-mono font-semibold">{b.designation}</span>{" "}
          <span className="text-sm text-mist">
            {COMPONENT_KIND_LABELS[b.kind]}
            {b.year ? `, ${b.year}` : ", year unknown"}
          </span>
        </p>
        {can(role, "rts.set_budget") && !editing && (
          <Button tone="quiet" onClick={() => setEditing(true)} aria-label={`Change the budget of ${b.designation}`}>
            Change
          </Button>
        )}
      </div>
      <p className={`mt-1 text-sm ${warn ? "font-semibold text-rust-300" : ""}`}>
        Used {b.status.used} · budget {b.budget} · left {b.status.remaining}
        {warn ? " ⚠" : ""}
      </p>
      <p className="text-xs text-mist">{b.budgetBasis}</p>
      {editing && (
        <div className="mt-2">
          <BudgetEditor siteId={siteId} b={b} onDone={() => setEditing(false)} />
        </div>
      )}
    </li>
  );
}

/** The board's breakers: operations used against each budget, the curator's budgets, and the record form. */
export function BreakerOperations({
  siteId,
  view,
  role,
}: {
  siteId: string;
  view: RtsBoardView;
  role: Role | "admin";
}) {
  const [all, setAll] = useState(false);
  const wide = useMediaQuery("(min-width: 48rem)");
  const shown = all ? view.breakers : view.breakers.filter((b) => b.status.used > 0 || b.budgetVersion > 0);
  return (
    <div className="space-y-3">
      <p className="text-sm text-mist">
        Every open and close is counted against the breaker's budget (Tideline's defaults by age; the curator sets
        each). The budget warns; it never blocks. Where a breaker is near its budget, consider energising from the
        temporary supply instead of working it.
      </p>
      {shown.length === 0 ? (
        <p className="text-sm" data-testid="no-operations-yet">
          No breaker of this board has been operated or given a budget of its own yet.
        </p>
      ) : !wide ? (
        <ul className="space-y-2" aria-label="Breaker operations against their budgets">
          {shown.map((b) => (
            <BreakerItem key={b.componentId} siteId={siteId} b={b} role={role} />
          ))}
        </ul>
      ) : (
        <div className="relative overflow-x-auto">
          <table className="w-full min-w-[40rem] text-sm">
            <caption className="sr-only">Breaker operations against their budgets</caption>
            <thead>
              <tr className="text-left">
                <th className="p-1">Position</th>
                <th className="p-1">Kind</th>
                <th className="p-1">Used</th>
                <th className="p-1">Budget</th>
                <th className="p-1">Left</th>
                <th className="p-1">Basis</th>
                <th className="p-1">
                  <span className="sr-only">Change</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {shown.map((b) => (
                <BreakerRow key={b.componentId} siteId={siteId} b={b} role={role} />
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Button tone="quiet" onClick={() => setAll(!all)}>
        {all ? "Only breakers already operated or budgeted" : `Show all ${view.breakers.length} breakers`}
      </Button>
      {can(role, "rts.record_operation") && <RecordOperation siteId={siteId} view={view} breakers={view.breakers} />}
    </div>
  );
}

/**
 * One position's breaker in the board's side panel: used against its budget, its operations
 * (who, why, which stage), and the record form.
 */
export function PositionOperations({
  siteId,
  view,
  positionId,
  role,
}: {
  siteId: string;
  view: RtsBoardView;
  positionId: string;
  role: Role | "admin";
}) {
  const b = view.breakers.find((x) => x.positionId === positionId);
  if (!b) return null;
  const ops = view.events.filter((e) => e.kind === "operation" && e.componentId === b.componentId);
  const next = operationsStatus(b.status.used, b.budget, 1);
  return (
    <section aria-labelledby="ops-panel-title" className="space-y-2">
      <h3 id="ops-panel-title" className="text-base font-bold">
        Breaker operations
      </h3>
      <p className={`text-sm ${next.wouldExceed ? "font-semibold text-rust-300" : ""}`} data-testid="operations-used">
        {b.status.used} of {b.budget} used · {b.status.remaining} left ({b.budgetBasis})
      </p>
      {ops.length > 0 && (
        <ol className="space-y-1 text-sm">
          {[...ops].reverse().map((o) => (
            <li key={o.id}>
              {when(o.at)} — {o.title}
              {o.by ? ` by ${o.by}` : ""}
              {o.stageName ? `, during “${o.stageName}”` : ", on its own"}: {o.detail}
            </li>
          ))}
        </ol>
      )}
      {can(role, "rts.record_operation") && <RecordOperation siteId={siteId} view={view} breakers={[b]} />}
    </section>
  );
}

/** The panel's breaker operations, loading the board's return-to-service view itself. */
export function PanelOperations({
  siteId,
  boardId,
  positionId,
  role,
}: {
  siteId: string;
  boardId: string;
  positionId: string;
  role: Role | "admin";
}) {
  const q = useRtsBoard(siteId, boardId);
  if (!q.data) return null;
  return <PositionOperations siteId={siteId} view={q.data} positionId={positionId} role={role} />;
}
