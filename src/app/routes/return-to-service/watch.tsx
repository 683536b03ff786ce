import { useState } from "react";
import { Link, useParams, useSearchParams } from "react-router";
import { z } from "zod";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { LAMP_LOOKS, LAMP_LOOK_LABELS, watchCheckBody, type RtsStage } from "../../../schemas/return-to-service";
import { useRecordWatchCheck, useRtsBoard } from "../../../features/return-to-service/api";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { RtsCaution } from "../../../features/return-to-service/components/rts-caution";
import { useSiteContext } from "../sites/site-layout";
import { clockTime } from "../../../lib/clock";

const big = "min-h-14 flex-1 rounded-md px-3 text-lg font-semibold ring-1";
const pick = (on: boolean) => (on ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 ring-hull-600");
const PHASES = ["A", "B", "C"] as const;
const needsPhaseOf = (lamps: string | null) => lamps === "one_dim" || lamps === "one_dark";

/**
 * The taps → the request body; watchCheckBody (the server's own schema) validates it. The phase
 * goes only with a dim or dark lamp; the time is added as it is sent (useRecordWatchCheck).
 */
const watchForm = z
  .object({
    lamps: z.string().nullable(),
    lampPhase: z.string().nullable(),
    smell: z.boolean(),
    sound: z.boolean(),
    warmToHand: z.boolean(),
    note: z.string(),
  })
  .transform((v) => ({ ...v, lampPhase: needsPhaseOf(v.lamps) ? v.lampPhase : null }) as z.input<typeof watchCheckBody>)
  .pipe(watchCheckBody);
type WatchFormValues = z.input<typeof watchForm>;
const blank: WatchFormValues = {
  lamps: null,
  lampPhase: null,
  smell: false,
  sound: false,
  warmToHand: false,
  note: "",
};

/** A watch check in a few taps, on a phone, in the dark. */
export default function WatchPage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const [search] = useSearchParams();
  const q = useRtsBoard(site.id, boardId);
  const act = useRecordWatchCheck(site.id);
  const form = useSchemaForm(watchForm, blank);
  const { register, setValue, formState } = form;
  const errors = formState.errors;
  const [lamps, phase, smell, sound, warm] = form.watch(["lamps", "lampPhase", "smell", "sound", "warmToHand"]);
  const tap = <K extends keyof WatchFormValues>(name: K, value: WatchFormValues[K]) =>
    setValue(name, value as never, { shouldDirty: true, shouldValidate: formState.isSubmitted });
  const [done, setDone] = useState<{ text: string; defectId: string | null; queued?: boolean } | null>(null);
  if (q.isPending) return <Loading what="Loading the stages under watch" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const live = q.data.stages.filter((s) => s.status === "energised");
  const stopped = q.data.stages.filter((s) => s.status === "stopped");
  const stage = live.find((s) => s.id === search.get("stage")) ?? live[0];
  const needsPhase = needsPhaseOf(lamps);
  const submit = form.handleSubmit((body) =>
    act.mutateAsync({ stageId: stage!.id, stageName: stage!.name, body }).then(
      (r) => {
        const abnormal = body.lamps !== "equal" || body.smell || body.sound || body.warmToHand;
        const inc = r.queued ? [] : r.data.incidents;
        setDone(
          r.queued
            ? {
                text: abnormal
                  ? "Kept on this phone: no signal, so no incident is recorded and nobody is told yet. What you saw is not normal: tell the qualified person in person now and follow the stop procedure."
                  : "Kept on this phone: no signal. It is logged at this minute and sent by itself when the connection returns.",
                defectId: null,
                queued: true,
              }
            : inc.length
              ? {
                  text: `Saved. Incident recorded: defect D-${inc[0].defectRef} opened and the stage is stopped. Tell the qualified person now.`,
                  defectId: inc[0].defectId,
                }
              : { text: "Saved. Thank you.", defectId: null },
        );
        form.reset(blank);
      },
      (err: unknown) => showSaveError(form, err),
    ),
  );
  const message = formMessage(errors);
  return (
    <div className="mx-auto max-w-md space-y-4">
      <p>
        <Link to={paths.rtsBoard.href(site.id, boardId)} className="inline-flex min-h-11 items-center">
          ← Return to service
        </Link>
      </p>
      <h1 className="text-2xl font-bold">Watch check</h1>
      <RtsCaution compact />
      {done && (
        <p
          role="status"
          className={`rounded-md p-3 font-semibold ${done.defectId ? "bg-rust-700 text-chalk" : done.queued ? "border-2 border-tide-300 bg-hull-850 text-tide-300" : "bg-hull-800"}`}
          data-testid={done.queued ? "watch-pending" : undefined}
        >
          {done.text}{" "}
          {done.defectId && (
            <Link className="underline" to={paths.defect.href(site.id, done.defectId)}>
              Open the defect
            </Link>
          )}
        </p>
      )}
      {stopped.map((s) => (
        <p key={s.id} className="rounded-md border border-rust-400 p-3 text-sm">
          <strong>{s.name}</strong> is stopped by an incident. Stopped is not dead: treat it as live until its
          de-energisation is recorded on the return-to-service page, and tell the qualified person what you see. Watch
          checks start again with the stage's next attempt.
        </p>
      ))}
      {!stage ? (
        <p>
          {stopped.length ? "No other stage" : "No stage"} of {q.data.board.name} is under watch.
        </p>
      ) : !can(role, "rts.record_watch") ? (
        // A reader sees the stage and when its check is due; no controls their role could not save.
        <div className="space-y-2">
          <StageDue stage={stage} />
          <p className="text-mist">Your role reads the watch; volunteers and the curator record checks.</p>
        </div>
      ) : (
        <form className="space-y-4" onSubmit={(e) => void submit(e)} noValidate aria-label="Watch check">
          <StageDue stage={stage} />
          <fieldset className="space-y-2">
            <legend className="font-semibold">
              Ground-detection lamps{" "}
              {fieldError(errors, "lamps") && (
                <span role="alert" className="text-rust-300">
                  — {fieldError(errors, "lamps")}
                </span>
              )}
            </legend>
            <div className="grid grid-cols-2 gap-2">
              {LAMP_LOOKS.map((l) => (
                <button
                  type="button"
                  key={l}
                  aria-pressed={lamps === l}
                  className={`${big} ${pick(lamps === l)}`}
                  onClick={() => tap("lamps", l)}
                >
                  {LAMP_LOOK_LABELS[l]}
                </button>
              ))}
            </div>
          </fieldset>
          {needsPhase && (
            <fieldset className="space-y-2">
              <legend className="font-semibold">
                Which phase's lamp?{" "}
                {fieldError(errors, "lampPhase") && (
                  <span role="alert" className="text-rust-300">
                    — {fieldError(errors, "lampPhase")}
                  </span>
                )}
              </legend>
              <div className="flex gap-2">
                {PHASES.map((p) => (
                  <button
                    type="button"
                    key={p}
                    aria-pressed={phase === p}
                    className={`${big} ${pick(phase === p)}`}
                    onClick={() => tap("lampPhase", p)}
                  >
                    {p}
                  </button>
                ))}
              </div>
            </fieldset>
          )}
          <fieldset className="space-y-2">
            <legend className="font-semibold">Anything noticed?</legend>
            <div className="flex gap-2">
              <button
                type="button"
                aria-pressed={smell}
                className={`${big} ${pick(smell)}`}
                onClick={() => tap("smell", !smell)}
              >
                Smell
              </button>
              <button
                type="button"
                aria-pressed={sound}
                className={`${big} ${pick(sound)}`}
                onClick={() => tap("sound", !sound)}
              >
                Sound
              </button>
              <button
                type="button"
                aria-pressed={warm}
                className={`${big} ${pick(warm)}`}
                onClick={() => tap("warmToHand", !warm)}
              >
                Warm
              </button>
            </div>
          </fieldset>
          <label className="block">
            Note
            <textarea
              className="mt-1 w-full rounded-md bg-hull-900 p-2 ring-1 ring-hull-600"
              aria-invalid={!!fieldError(errors, "note")}
              {...register("note")}
            />
          </label>
          {fieldError(errors, "note") && (
            <p role="alert" className="text-sm text-rust-300">
              {fieldError(errors, "note")}
            </p>
          )}
          <Button
            type="submit"
            className="w-full"
            disabled={!lamps || (needsPhase && !phase) || formState.isSubmitting}
          >
            Save the check
          </Button>
          {message && (
            <p role="alert" className="text-rust-300">
              {message}
            </p>
          )}
        </form>
      )}
    </div>
  );
}

/** The stage under watch and when its next check is due (or since when it is overdue). */
function StageDue({ stage }: { stage: RtsStage }) {
  return (
    <p className="text-sm">
      <strong>{stage.name}</strong>
      <br />
      {stage.watch?.overdueSince ? (
        <span className="font-semibold text-rust-300">Overdue since {clockTime(stage.watch.overdueSince)}</span>
      ) : stage.watch?.nextDueAt ? (
        `Next due ${clockTime(stage.watch.nextDueAt)}`
      ) : (
        ""
      )}
    </p>
  );
}
