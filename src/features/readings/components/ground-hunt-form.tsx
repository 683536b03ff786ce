import { useState, type FormEvent } from "react";
import { SelectField, TextField } from "../../../components/field";
import { LAMP_LOOKS, PHASE_KEYS, groundHuntBody, type GroundHunt } from "../../../schemas/readings";
import { pendingFor, useOutbox } from "../../../lib/outbox";
import { huntStepsUrl, useRecordHuntStep } from "../api";
import { fieldErrors, localNow, toIso } from "../format";
import { ChoiceChips } from "./choice-chips";
import { FormShell, WhenField, saveErrors } from "./form-bits";
import { GroundHuntLog } from "./ground-hunt-log";
import { LiveWorkCaution } from "./live-work-caution";

export interface FeederOption {
  positionId: string;
  designation: string;
  circuit: string;
}

const LOOK_LABEL = { bright: "Bright", dim: "Dim", dark: "Dark" } as const;
const OTHER = "__other";

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
  const [hunt, setHunt] = useState(() => open?.hunt ?? `Ground hunt ${localNow().replace("T", " ")}`);
  const [feeder, setFeeder] = useState(feeders[0]?.positionId ?? OTHER);
  const [action, setAction] = useState<"opened" | "closed">("opened");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [justSaved, setJustSaved] = useState(false);
  const outbox = useOutbox();

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const picked = feeders.find((p) => p.positionId === feeder);
    const body = {
      hunt,
      positionId: picked?.positionId ?? null,
      feeder: picked
        ? `${picked.designation}${picked.circuit ? ` · ${picked.circuit}` : ""}`
        : String(f.get("feederName") ?? ""),
      action,
      lamps: { A: f.get("lampA"), B: f.get("lampB"), C: f.get("lampC") },
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = groundHuntBody.safeParse(body);
    setMessage(null);
    setJustSaved(false);
    if (!parsed.success) {
      const fe = fieldErrors(parsed.error.issues);
      if (fe.feeder) fe.feederName = fe.feeder;
      setErrors(fe);
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    save.mutate(parsed.data, {
      onSuccess: (r) => {
        setJustSaved(!r.queued);
        // the next feeder in the list is the usual next step
        const i = feeders.findIndex((p) => p.positionId === feeder);
        if (i >= 0 && i + 1 < feeders.length) setFeeder(feeders[i + 1].positionId);
      },
      onError: (err) => {
        const s = saveErrors(err);
        setErrors(s.fields);
        setMessage(s.message);
      },
    });
  }

  const current = hunts.find((h) => h.hunt === hunt.trim());
  const waiting = pendingFor(outbox.items, huntStepsUrl(siteId, boardId)).filter(
    (i) => i.state === "waiting" && (i.body as { hunt?: string } | undefined)?.hunt === hunt.trim(),
  );
  return (
    <div className="space-y-3">
      <FormShell
        title="Log a ground-hunt step"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save this step"
      >
        <LiveWorkCaution kind="hunt" />
        <TextField
          label="Hunt"
          name="hunt"
          value={hunt}
          onChange={(e) => setHunt(e.target.value)}
          list="ground-hunt-names"
          hint="Steps with the same name make one hunt"
          error={errors.hunt}
          className="sm:col-span-2"
        />
        <datalist id="ground-hunt-names">
          {hunts.map((h) => (
            <option key={h.hunt} value={h.hunt} />
          ))}
        </datalist>
        <SelectField
          label="Feeder"
          name="feederPick"
          value={feeder}
          onChange={(e) => setFeeder(e.target.value)}
          error={feeder === OTHER ? undefined : errors.feeder || errors.positionId}
        >
          {feeders.map((p) => (
            <option key={p.positionId} value={p.positionId}>
              {p.designation}
              {p.circuit ? ` · ${p.circuit}` : ""}
            </option>
          ))}
          <option value={OTHER}>Another feeder (type its name)</option>
        </SelectField>
        {feeder === OTHER && <TextField label="Feeder name" name="feederName" error={errors.feederName} />}
        <ChoiceChips
          legend="What was done"
          name="action"
          options={[
            ["opened", "Opened"],
            ["closed", "Closed again"],
          ]}
          value={action}
          onChange={setAction}
        />
        {PHASE_KEYS.map((p) => (
          <ChoiceChips
            key={p}
            legend={`Then phase ${p} lamp`}
            name={`lamp${p}`}
            options={LAMP_LOOKS.map((l) => [l, LOOK_LABEL[l]] as const)}
            defaultValue="bright"
            className="[&_div]:grid-cols-3"
          />
        ))}
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" />
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
