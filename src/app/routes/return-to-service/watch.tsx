import { useState } from "react";
import { Link, useParams, useSearchParams } from "react-router";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { LAMP_LOOKS, LAMP_LOOK_LABELS } from "../../../schemas/return-to-service";
import { useRecordWatchCheck, useRtsBoard } from "../../../features/return-to-service/api";
import { ApiError } from "../../../lib/api-client";
import { RtsCaution } from "../../../features/return-to-service/components/rts-caution";
import { useSiteContext } from "../sites/site-layout";

const big = "min-h-14 flex-1 rounded-md px-3 text-lg font-semibold ring-1";
const pick = (on: boolean) => (on ? "bg-brass-400 text-hull-950 ring-brass-300" : "bg-hull-800 ring-hull-600");

/** A watch check in a few taps, on a phone, in the dark. */
export default function WatchPage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const [search] = useSearchParams();
  const q = useRtsBoard(site.id, boardId);
  const act = useRecordWatchCheck(site.id);
  const [lamps, setLamps] = useState<(typeof LAMP_LOOKS)[number] | null>(null);
  const [phase, setPhase] = useState<"A" | "B" | "C" | null>(null);
  const [smell, setSmell] = useState(false);
  const [sound, setSound] = useState(false);
  const [warm, setWarm] = useState(false);
  const [note, setNote] = useState("");
  const [done, setDone] = useState<{ text: string; defectId: string | null; queued?: boolean } | null>(null);
  if (q.isPending) return <Loading what="Loading the stages under watch" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const live = q.data.stages.filter((s) => s.status === "energised");
  const stopped = q.data.stages.filter((s) => s.status === "stopped");
  const stage = live.find((s) => s.id === search.get("stage")) ?? live[0];
  const needsPhase = lamps === "one_dim" || lamps === "one_dark";
  const save = () =>
    act.mutate(
      {
        stageId: stage!.id,
        stageName: stage!.name,
        body: { lamps, lampPhase: needsPhase ? phase : null, smell, sound, warmToHand: warm, note },
      },
      {
        onSuccess: (r) => {
          const abnormal = lamps !== "equal" || smell || sound || warm;
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
          setLamps(null);
          setPhase(null);
          setSmell(false);
          setSound(false);
          setWarm(false);
          setNote("");
        },
      },
    );
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
          <strong>{s.name}</strong> is stopped by an incident: no watch checks until the curator starts it again.
        </p>
      ))}
      {!stage ? (
        <p>No stage of {q.data.board.name} is live under watch.</p>
      ) : (
        <form
          className="space-y-4"
          onSubmit={(e) => {
            e.preventDefault();
            save();
          }}
          aria-label="Watch check"
        >
          <p className="text-sm">
            <strong>{stage.name}</strong>
            <br />
            {stage.watch?.overdueSince ? (
              <span className="font-semibold text-rust-300">
                Overdue since{" "}
                {new Date(stage.watch.overdueSince).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" })}
              </span>
            ) : stage.watch?.nextDueAt ? (
              `Next due ${new Date(stage.watch.nextDueAt).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" })}`
            ) : (
              ""
            )}
          </p>
          <fieldset className="space-y-2">
            <legend className="font-semibold">Ground-detection lamps</legend>
            <div className="grid grid-cols-2 gap-2">
              {LAMP_LOOKS.map((l) => (
                <button
                  type="button"
                  key={l}
                  aria-pressed={lamps === l}
                  className={`${big} ${pick(lamps === l)}`}
                  onClick={() => setLamps(l)}
                >
                  {LAMP_LOOK_LABELS[l]}
                </button>
              ))}
            </div>
          </fieldset>
          {needsPhase && (
            <fieldset className="space-y-2">
              <legend className="font-semibold">Which phase's lamp?</legend>
              <div className="flex gap-2">
                {(["A", "B", "C"] as const).map((p) => (
                  <button
                    type="button"
                    key={p}
                    aria-pressed={phase === p}
                    className={`${big} ${pick(phase === p)}`}
                    onClick={() => setPhase(p)}
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
                onClick={() => setSmell(!smell)}
              >
                Smell
              </button>
              <button
                type="button"
                aria-pressed={sound}
                className={`${big} ${pick(sound)}`}
                onClick={() => setSound(!sound)}
              >
                Sound
              </button>
              <button
                type="button"
                aria-pressed={warm}
                className={`${big} ${pick(warm)}`}
                onClick={() => setWarm(!warm)}
              >
                Warm
              </button>
            </div>
          </fieldset>
          <label className="block">
            Note
            <textarea
              className="mt-1 w-full rounded-md bg-hull-900 p-2 ring-1 ring-hull-600"
              value={note}
              onChange={(e) => setNote(e.target.value)}
            />
          </label>
          {can(role, "rts.record_watch") ? (
            <Button type="submit" className="w-full" disabled={!lamps || (needsPhase && !phase) || act.isPending}>
              Save the check
            </Button>
          ) : (
            <p className="text-mist">Your role reads the watch; volunteers and the curator record checks.</p>
          )}
          {act.error && (
            <p role="alert" className="text-rust-300">
              {act.error instanceof ApiError ? act.error.message : String(act.error)}
            </p>
          )}
        </form>
      )}
    </div>
  );
}
