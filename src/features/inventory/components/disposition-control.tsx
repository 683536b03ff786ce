import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { TextArea } from "../../../components/field";
import { DISPOSITION_LABELS, DISPOSITIONS, type Disposition } from "../../../domain/vocab";
import { fieldError, hasFieldErrors, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { dispositionBody } from "../../../schemas/inventory";
import { useDecideDisposition } from "../api";
import type { Component, RecommendationResponse } from "../contract";
import { ConflictNotice, conflictRecord } from "./conflict-notice";
import { DISPOSITION_STYLE } from "./tile-style";

const LABELS = {
  disposition: "Disposition",
  dispositionReason: "Reason",
  dispositionOverridden: "Overrides the recommendation",
};

/**
 * The form's values → the request body (without the version: the record's, added on sending);
 * dispositionBody (the server's own schema) validates it, and what the form asks beyond it, a reason
 * for going against the recommendation, is a further part of the same schema (the server asks it too).
 */
const dispositionForm = (recommended: Disposition | null) =>
  z
    .object({ disposition: z.string().nullable(), reason: z.string() })
    .transform(
      (v) =>
        ({ disposition: v.disposition ?? "", reason: v.reason }) as Omit<z.input<typeof dispositionBody>, "version">,
    )
    .pipe(
      dispositionBody.omit({ version: true }).and(
        z
          .object({ disposition: z.string(), reason: z.string() })
          .refine((b) => !recommended || b.disposition === recommended || b.reason.trim() !== "", {
            message: "Say why you are overriding the recommendation",
            path: ["reason"],
          }),
      ),
    );

function Recommendation({ rec }: { rec: RecommendationResponse | null }) {
  const r = rec?.recommendation;
  if (!r)
    return (
      <p className="text-sm text-fog">
        No recommendation yet: record the site's flood event first (water type drives the guidance).
      </p>
    );
  return (
    <div className="rounded-md bg-hull-800 p-3 text-sm" data-testid="recommendation">
      <p>
        Recommended:{" "}
        <strong className={`rounded border px-1 ${DISPOSITION_STYLE[r.disposition].chip}`}>
          {DISPOSITION_LABELS[r.disposition]}
        </strong>
      </p>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-mist">
        {r.reasons.map((x) => (
          <li key={x}>{x}</li>
        ))}
      </ul>
      {rec.assumptions.length > 0 && (
        <p className="mt-2 text-xs text-brass-300">Assumed: {rec.assumptions.join(" ")}</p>
      )}
      <p className="mt-2 text-xs text-fog">Source: {r.source}</p>
    </div>
  );
}

/** The curator's decision: the recommendation with its reasons, and an override that needs a reason. */
export function DispositionControl({
  siteId,
  component,
  recommendation,
  canDecide,
}: {
  siteId: string;
  component: Component;
  recommendation: RecommendationResponse | null;
  canDecide: boolean;
}) {
  const recommended = recommendation?.recommendation?.disposition ?? null;
  // The record the form started from (its version goes with the save): not an input.
  const [base, setBase] = useState<Component>(component);
  const schema = useMemo(() => dispositionForm(recommended), [recommended]);
  const form = useSchemaForm(schema, { disposition: component.disposition ?? recommended, reason: "" });
  const { register, formState } = form;
  const errors = formState.errors;
  const [choice, reason] = form.watch(["disposition", "reason"]);
  const decide = useDecideDisposition(siteId);
  const conflict = conflictRecord<Component>(decide.error);
  // A newer version that changed no disposition field (e.g. a custody move) is adopted quietly;
  // one that changed the decision is left for the 409 to show. Adjusted while rendering, as React's
  // "storing information from previous renders" advises, not in an effect (one render, not two).
  const sameDecision =
    component.disposition === base.disposition && component.dispositionReason === base.dispositionReason;
  if (component.version > base.version && sameDecision && !decide.isPending) setBase(component);
  const overriding = !!choice && !!recommended && choice !== recommended;
  // The reason's message speaks for itself; a stale version shows as the conflict notice below.
  const message = conflict || hasFieldErrors(errors) ? null : serverMessage(errors);

  const save = (version: number) =>
    form.handleSubmit((body) =>
      decide.mutateAsync({ componentId: component.id, ...body, version }).then(
        (r) => {
          setBase(r.component);
          form.setValue("reason", "");
        },
        (err: unknown) => {
          if (!conflictRecord(err)) showSaveError(form, err);
        },
      ),
    )();

  return (
    <section aria-labelledby="disp-title" className="space-y-3">
      <h3 id="disp-title" className="text-base font-bold">
        Disposition
      </h3>
      <p className="text-sm">
        Decided: <strong>{component.disposition ? DISPOSITION_LABELS[component.disposition] : "not yet"}</strong>
        {component.dispositionOverridden && (
          <span className="ml-2 rounded bg-brass-300 px-1 text-xs font-semibold text-hull-950">override</span>
        )}
        {component.dispositionReason && <span className="block text-mist">“{component.dispositionReason}”</span>}
      </p>
      <Recommendation rec={recommendation} />
      {canDecide && (
        <form
          onSubmit={(ev) => {
            ev.preventDefault();
            void save(base.version);
          }}
          noValidate
          className="space-y-3"
          aria-label="Decide the disposition"
        >
          <fieldset>
            <legend className="text-sm font-semibold text-mist">Decide</legend>
            <div className="mt-1 grid grid-cols-2 gap-2">
              {DISPOSITIONS.map((d) => (
                <label
                  key={d}
                  className={`flex min-h-11 min-w-0 cursor-pointer flex-wrap items-center gap-x-2 rounded-md border px-3 py-1 ${choice === d ? "border-brass-300 bg-hull-700" : "border-hull-600"}`}
                >
                  <input type="radio" {...register("disposition")} value={d} className="h-4 w-4 accent-brass-400" />
                  {DISPOSITION_LABELS[d]}
                  {d === recommended && <span className="text-xs text-fog">(recommended)</span>}
                </label>
              ))}
            </div>
          </fieldset>
          {overriding && (
            <TextArea
              label="Why override the recommendation? (recorded)"
              {...register("reason")}
              error={fieldError(errors, "reason")}
              hint="E.g. keep original fabric: rebuild under a qualified person instead of replacing."
            />
          )}
          {conflict && (
            <ConflictNotice
              base={base}
              current={conflict}
              labels={LABELS}
              words={{ disposition: (v) => DISPOSITION_LABELS[v as Disposition] ?? v }}
              busy={decide.isPending}
              onUseTheirs={() => {
                setBase(conflict);
                form.reset({ disposition: conflict.disposition, reason: "" });
                decide.reset();
              }}
              onApplyMine={() => {
                setBase(conflict);
                void save(conflict.version);
              }}
            />
          )}
          {message && (
            <p role="alert" className="text-sm text-flare-300">
              {message}
            </p>
          )}
          {decide.isSuccess && (
            <p role="status" className="text-sm text-kelp-300">
              Saved.
            </p>
          )}
          <Button
            type="submit"
            disabled={!choice || decide.isPending || (choice === component.disposition && !reason.trim())}
          >
            {overriding ? "Save override" : "Save disposition"}
          </Button>
        </form>
      )}
    </section>
  );
}
