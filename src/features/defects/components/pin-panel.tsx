import { z } from "zod";
import { Button } from "../../../components/button";
import { WithMessage } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { text } from "../../../schemas/common";
import { pinBody, type DefectDetail } from "../../../schemas/defects";
import { findByRef, usePinDefect, useUnpinDefect } from "../api";
import { stamp as when } from "../../../lib/clock";

/**
 * The form's text → pinBody's direction and reason (the server's own rules) and the reference typed;
 * the reference becomes the other defect's id (relativeTo) once it is looked up, on saving.
 */
const pinForm = z
  .object({ direction: z.string(), ref: z.string(), reason: z.string() })
  .pipe(
    pinBody
      .pick({ direction: true, reason: true })
      .extend({ ref: text().trim().min(1, { message: "Give the other defect's reference, e.g. D-12" }) }),
  );

const box = "mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk";

/** The curator's order: a defect placed just before or after another, with the reason, who and when; the curator sets or lifts it. */
export function PinPanel({ siteId, detail, canManage }: { siteId: string; detail: DefectDetail; canManage: boolean }) {
  const d = detail.defect;
  const pin = usePinDefect(siteId, d.id);
  const unpin = useUnpinDefect(siteId, d.id);
  const active = detail.pins.find((p) => !p.removedAt);
  const form = useSchemaForm(pinForm, { direction: "above", ref: "", reason: "" });
  const { register, formState } = form;
  const e = (name: "direction" | "ref" | "reason") => fieldError(formState.errors, name);
  const submit = form.handleSubmit(async ({ ref, ...rest }) => {
    const target = await findByRef(siteId, ref).catch(() => null);
    if (!target) return form.setError("ref", { message: "No defect has that reference on this site." });
    await pin.mutateAsync({ ...rest, relativeTo: target.id }).then(
      () => form.reset(),
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    );
  });
  // Lifting is a button, not a form: its refusal is the mutation's own error.
  const liftError = unpin.error && (unpin.error instanceof ApiError ? unpin.error.message : "That did not work.");
  const message = formMessage(formState.errors) ?? liftError;
  return (
    <section aria-labelledby="pin-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="pin-title" className="text-lg font-bold">
        Curator's order
      </h2>
      {detail.pins.length === 0 && (
        <p className="text-mist">Not placed by the curator: it sits where its priority score puts it.</p>
      )}
      <ul className="space-y-2">
        {detail.pins.map((p) => (
          <li
            key={p.id}
            className={`rounded-md p-2 ring-1 ${p.removedAt ? "ring-hull-700 text-fog" : "ring-tide-400"}`}
          >
            <p>
              Placed <strong>{p.direction === "above" ? "before" : "after"}</strong> D-{p.relativeRef ?? "?"} by{" "}
              {p.pinnedByName ?? "someone"} on {when(p.pinnedAt)} {p.removedAt ? "(lifted)" : "(in force)"}
            </p>
            <p className="text-sm">Reason: {p.reason}</p>
            {p.removedAt && (
              <p className="text-sm">
                Lifted by {p.removedByName ?? "someone"} on {when(p.removedAt)}
                {p.removedReason ? `: ${p.removedReason}` : ""}
              </p>
            )}
          </li>
        ))}
      </ul>
      {canManage && active && (
        <Button
          tone="quiet"
          className="mt-2"
          onClick={() => {
            form.clearErrors();
            unpin.mutate({ reason: "Lifted by the curator" });
          }}
        >
          Back to its score's place
        </Button>
      )}
      {canManage && (
        <form
          onSubmit={(ev) => {
            unpin.reset();
            void submit(ev);
          }}
          noValidate
          className="mt-3 grid gap-2 sm:grid-cols-[auto_8rem_1fr_auto] sm:items-end"
        >
          <WithMessage error={e("direction")}>
            {(describedBy) => (
              <label className="text-sm font-semibold text-mist">
                Do it
                <select {...register("direction")} aria-describedby={describedBy} className={box}>
                  <option value="above">before</option>
                  <option value="below">after</option>
                </select>
              </label>
            )}
          </WithMessage>
          <WithMessage error={e("ref")}>
            {(describedBy) => (
              <label className="text-sm font-semibold text-mist">
                defect
                <input
                  {...register("ref")}
                  required
                  placeholder="D-12"
                  aria-invalid={!!e("ref")}
                  aria-describedby={describedBy}
                  className={`${box} w-full font-mono`}
                />
              </label>
            )}
          </WithMessage>
          <WithMessage error={e("reason")}>
            {(describedBy) => (
              <label className="text-sm font-semibold text-mist">
                because
                <input
                  {...register("reason")}
                  required
                  minLength={3}
                  aria-invalid={!!e("reason")}
                  aria-describedby={describedBy}
                  className={`${box} w-full`}
                />
              </label>
            )}
          </WithMessage>
          <Button type="submit" disabled={pin.isPending}>
            Set the order
          </Button>
        </form>
      )}
      {message && (
        <p role="alert" className="mt-2 text-flare-300">
          {message}
        </p>
      )}
    </section>
  );
}
