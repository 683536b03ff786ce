import { useState, type FormEvent } from "react";
import type { Verdict } from "../../../domain/reading-judgement";
import { TextField } from "../../../components/field";
import { contactReadingBody } from "../../../schemas/readings";
import { useRecordContact } from "../api";
import { fieldErrors, numOrNull, toIso } from "../format";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  saveErrors,
  type TargetOption,
} from "./form-bits";
import { VerdictBadge } from "./verdict-badge";

export function ContactForm({
  siteId,
  options,
  defaultComponentId,
}: {
  siteId: string;
  options: TargetOption[];
  defaultComponentId?: string;
}) {
  const save = useRecordContact(siteId);
  const [poles, setPoles] = useState(3);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<null | { verdict: Verdict; reasons: string[] }>(null);
  const [queued, setQueued] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const componentId = String(f.get("componentId") ?? "");
    const body = {
      poleMicroOhms: Array.from({ length: poles }, (_, i) => numOrNull(f.get(`pole${i}`))),
      testCurrentA: numOrNull(f.get("testCurrentA")),
      instrument: String(f.get("instrument") ?? ""),
      notes: String(f.get("notes") ?? ""),
      measuredAt: toIso(String(f.get("measuredAt") ?? "")),
    };
    const parsed = contactReadingBody.safeParse(body);
    setMessage(null);
    if (!parsed.success || !componentId) {
      setErrors({
        ...(parsed.success ? {} : fieldErrors(parsed.error.issues)),
        ...(componentId ? {} : { componentId: "Choose the breaker" }),
      });
      setMessage("Check the fields marked below.");
      return;
    }
    setErrors({});
    save.mutate(
      {
        componentId,
        label: options.find((o) => o.componentId === componentId)?.designation ?? "breaker",
        ...parsed.data,
      },
      {
        onSuccess: (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : r.data.judgement);
        },
        onError: (err) => {
          const s = saveErrors(err);
          setErrors(s.fields);
          setMessage(s.message);
        },
      },
    );
  }

  return (
    <div className="space-y-3">
      <FormShell
        title="Record pole contact resistance"
        onSubmit={submit}
        error={message}
        busy={save.isPending}
        submitLabel="Save contact readings"
      >
        <ComponentSelect
          options={options}
          label="Breaker or switch"
          defaultValue={defaultComponentId}
          error={errors.componentId}
        />
        <label className="block text-sm font-semibold text-mist">
          Poles
          <select
            value={poles}
            onChange={(e) => setPoles(Number(e.target.value))}
            className="mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk"
          >
            {[1, 2, 3, 4].map((n) => (
              <option key={n} value={n}>
                {n}
              </option>
            ))}
          </select>
        </label>
        {Array.from({ length: poles }, (_, i) => (
          <NumberField
            key={i}
            label={`Pole ${i + 1} (µΩ)`}
            name={`pole${i}`}
            required
            error={errors[`poleMicroOhms.${i}`]}
          />
        ))}
        <NumberField label="Test current (A)" name="testCurrentA" defaultValue={100} error={errors.testCurrentA} />
        <TextField label="Instrument" name="instrument" />
        <WhenField error={errors.measuredAt} />
        <TextField label="Notes" name="notes" className="sm:col-span-2" />
      </FormShell>
      {queued && <KeptOnPhone what="Contact readings" />}
      {saved && (
        <div role="status" className="rounded-md bg-hull-800 p-3">
          <VerdictBadge verdict={saved.verdict} />
          <ul className="mt-1 list-disc pl-5 text-sm">
            {saved.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
