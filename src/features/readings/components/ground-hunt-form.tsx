import { useMemo, useState } from "react";
import { z } from "zod";
import { SelectField, TextField } from "../../../components/field";
import { fieldError, formMessage, localDateTime, showSaveError, useSchemaForm } from "../../../lib/form";
import { LAMP_LOOKS, PHASE_KEYS, groundHuntBody, type GroundHunt } from "../../../schemas/readings";
import { pendingFor, useOutbox } from "../../../lib/outbox";
import { huntStepsUrl, useRecordHuntStep } from "../api";
import { localNow } from "../format";
import { ChoiceChips } from "./choice-chips";
import { FormShell, WhenField, useFreshWhen } from "./form-bits";
import { GroundHuntLog } from "./ground-hunt-log";
import { LiveWorkCaution } from "./live-work-caution";

export interface FeederOption {
  positionId: string;
  designation: string;
  circuit: string;
}

const LOOK_LABEL = { bright: "Bright", dim: "Dim", dark: "Dark" } as const;
const OTHER = "__other";

/** The form's text → the request body; groundHuntBody (shared with the server) validates it. */
const groundHuntForm = (feeders: FeederOption[]) =>
  z
    .object({
      hunt: z.string(),
      feederPick: z.string(),
      feederName: z.string(),
      action: z.string(),
      lamps: z.object({ A: z.string(), B: z.string(), C: z.string() }),
      notes: z.string(),
      measuredAt: localDateTime,
    })
    // A feeder from the board's list is sent by its position and name; "another feeder" by the name typed.
    .transform(({ feederPick, feederName, ...v }) => {
      const picked = feeders.find((p) => p.positionId === feederPick);
      return {
        ...v,
        positionId: picked?.positionId ?? null,
        feeder: picked ? `${picked.designation}${picked.circuit ? ` · ${picked.circuit}` : ""}` : feederName,
      } as z.input<typeof groundHuntBody>;
    })
    .pipe(groundHuntBody);
type GroundHuntFormValues = z.input<ReturnType<typeof groundHuntForm>>;

/**
 * Hunting a ground on a live board: open one feeder at a time and log how the three lamps look
 * after each. Each step saves at once; with no signal it waits on the phone (src/lib/outbox) and is
 * listed here until sent. The hunt's log and what it points at (src/domain/ground-detection.ts,
 * groundHuntFinding) show under the form once the server has the steps.
 */
export function GroundHuntForm({
  siteId,
  boardId,
  feeders,
  hunts,
}: {
  siteId: string;
  boardId: string;
  feeders: FeederOption[];
  hunts: GroundHunt[];
}) {
  const save = useRecordHuntStep(siteId, boardId);
  const open = hunts.find((h) => h.finding.feeder === null);
  const schema = useMemo(() => groundHuntForm(feeders), [feeders]);
  const [defaults] = useState<GroundHuntFormValues>(() => ({
    hunt: open?.hunt ?? `Ground hunt ${localNow().replace("T", " ")}`,
    feederPick: feeders[0]?.positionId ?? OTHER,
    feederName: "",
    action: "opened",
    lamps: { A: "bright", B: "bright", C: "bright" },
    notes: "",
    measuredAt: localNow(),
  }));
  const form = useSchemaForm(schema, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const [hunt, feeder] = form.watch(["hunt", "feederPick"]);
  const [justSaved, setJustSaved] = useState(false);
  const outbox = useOutbox();
  const e = (name: Parameters<typeof fieldError<GroundHuntFormValues>>[1]) => fieldError(errors, name);
  // The body's feeder (and position) is made from the list or the typed name: its message goes to whichever shows.
  const feederError = e("feeder" as keyof GroundHuntFormValues) ?? e("positionId" as keyof GroundHuntFormValues);

  const submit = form.handleSubmit((body) => {
    setJustSaved(false);
    return save.mutateAsync(body).then(
      (r) => {
        setJustSaved(!r.queued);
        // the next feeder in the list is the usual next step
        const i = feeders.findIndex((p) => p.positionId === feeder);
        if (i >= 0 && i + 1 < feeders.length) form.setValue("feederPick", feeders[i + 1].positionId);
      },
      (err) => showSaveError(form, err),
    );
  });

  const current = hunts.find((h) => h.hunt === hunt.trim());
  const waiting = pendingFor(outbox.items, huntStepsUrl(siteId, boardId)).filter(
    (i) => i.state === "waiting" && (i.body as { hunt?: string } | undefined)?.hunt === hunt.trim(),
  );
  return (
    <div className="space-y-3">
      <FormShell
        title="Log a ground-hunt step"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save this step"
      >
        <LiveWorkCaution kind="hunt" />
        <TextField
          label="Hunt"
          {...form.register("hunt")}
          list="ground-hunt-names"
          hint="Steps with the same name make one hunt"
          error={e("hunt")}
          className="sm:col-span-2"
        />
        <datalist id="ground-hunt-names">
          {hunts.map((h) => (
            <option key={h.hunt} value={h.hunt} />
          ))}
        </datalist>
        <SelectField label="Feeder" {...form.register("feederPick")} error={feeder === OTHER ? undefined : feederError}>
          {feeders.map((p) => (
            <option key={p.positionId} value={p.positionId}>
              {p.designation}
              {p.circuit ? ` · ${p.circuit}` : ""}
            </option>
          ))}
          <option value={OTHER}>Another feeder (type its name)</option>
        </SelectField>
        {feeder === OTHER && <TextField label="Feeder name" {...form.register("feederName")} error={feederError} />}
        <ChoiceChips
          legend="What was done"
          name="action"
          options={[
            ["opened", "Opened"],
            ["closed", "Closed again"],
          ]}
          registered={form.register("action")}
        />
        {PHASE_KEYS.map((p) => (
          <ChoiceChips
            key={p}
            legend={`Then phase ${p} lamp`}
            name={`lamps.${p}`}
            options={LAMP_LOOKS.map((l) => [l, LOOK_LABEL[l]] as const)}
            registered={form.register(`lamps.${p}`)}
            className="[&_div]:grid-cols-3"
          />
        ))}
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} error={e("notes")} />
      </FormShell>
      {waiting.length > 0 && (
        <div
          role="status"
          className="rounded-md border-2 border-tide-300 bg-hull-850 p-3"
          data-testid="reading-pending"
        >
          <p className="font-semibold text-tide-300">
            {waiting.length === 1 ? "1 step" : `${waiting.length} steps`} of this hunt kept on this phone: no signal.
            They are sent by themselves, in order, when the connection returns.
          </p>
          <ol className="mt-1 list-decimal pl-5 text-sm text-mist">
            {waiting.map((i) => (
              <li key={i.id}>{i.label.replace(/^Ground-hunt step, [^:]*: /, "")}</li>
            ))}
          </ol>
          <p className="mt-1 text-sm text-mist">
            What the hunt points at shows once the server has these steps. Keep the board&apos;s qualified person told
            in person meanwhile.
          </p>
        </div>
      )}
      {current ? (
        <GroundHuntLog hunt={current} live={justSaved} />
      ) : (
        <p className="text-mist">No steps logged in “{hunt}” yet.</p>
      )}
    </div>
  );
}
