import { useMemo, useState } from "react";
import { z } from "zod";
import type { Verdict } from "../../../domain/reading-judgement";
import { SelectField, TextField } from "../../../components/field";
import { fieldError, formMessage, localDateTime, numberText, showSaveError, useSchemaForm } from "../../../lib/form";
import { contactReadingBody } from "../../../schemas/readings";
import { useRecordContact } from "../api";
import { localNow } from "../format";
import {
  ComponentSelect,
  FormShell,
  KeptOnPhone,
  NumberField,
  WhenField,
  type TargetOption,
  useFreshWhen,
} from "./form-bits";
import { VerdictBadge } from "./verdict-badge";

const POLE_COUNTS = [1, 2, 3, 4];

/** The body and the breaker it is taken on (a path parameter, so the form alone asks for it). */
const contactBody = contactReadingBody.extend({ componentId: z.string().min(1, { message: "Choose the breaker" }) });

/** The form's text → the request body; contactReadingBody (shared with the server) validates it. */
const contactForm = z
  .object({
    componentId: z.string(),
    poles: z.string(),
    poleMicroOhms: z.array(numberText),
    testCurrentA: numberText,
    instrument: z.string(),
    notes: z.string(),
    measuredAt: localDateTime,
  })
  // Only the poles shown count: a pole field hidden by a smaller count keeps its text but is not sent.
  .transform(
    ({ poles, poleMicroOhms, ...v }) =>
      ({ ...v, poleMicroOhms: poleMicroOhms.slice(0, Number(poles)) }) as z.input<typeof contactBody>,
  )
  .pipe(contactBody);
type ContactFormValues = z.input<typeof contactForm>;

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
  const defaults = useMemo<ContactFormValues>(
    () => ({
      componentId: defaultComponentId ?? options[0]?.componentId ?? "",
      poles: "3",
      poleMicroOhms: POLE_COUNTS.map(() => ""),
      testCurrentA: "100",
      instrument: "",
      notes: "",
      measuredAt: localNow(),
    }),
    [defaultComponentId, options],
  );
  const form = useSchemaForm(contactForm, defaults);
  useFreshWhen(form);
  const errors = form.formState.errors;
  const poles = Number(form.watch("poles"));
  const [saved, setSaved] = useState<null | { verdict: Verdict; reasons: string[] }>(null);
  const [queued, setQueued] = useState(false);
  const e = (name: Parameters<typeof fieldError<ContactFormValues>>[1]) => fieldError(errors, name);

  const submit = form.handleSubmit(({ componentId, ...body }) =>
    save
      .mutateAsync({
        componentId,
        label: options.find((o) => o.componentId === componentId)?.designation ?? "breaker",
        ...body,
      })
      .then(
        (r) => {
          setQueued(r.queued);
          setSaved(r.queued ? null : r.data.judgement);
        },
        (err) => showSaveError(form, err),
      ),
  );

  return (
    <div className="space-y-3">
      <FormShell
        title="Record pole contact resistance"
        onSubmit={(ev) => void submit(ev)}
        error={formMessage(errors)}
        busy={save.isPending}
        submitLabel="Save contact readings"
      >
        <ComponentSelect
          options={options}
          label="Breaker or switch"
          {...form.register("componentId")}
          error={e("componentId")}
        />
        <SelectField label="Poles" {...form.register("poles")}>
          {POLE_COUNTS.map((n) => (
            <option key={n} value={n}>
              {n}
            </option>
          ))}
        </SelectField>
        {POLE_COUNTS.slice(0, poles).map((n, i) => (
          <NumberField
            key={n}
            label={`Pole ${n} (µΩ)`}
            {...form.register(`poleMicroOhms.${i}`)}
            required
            error={e(`poleMicroOhms.${i}`)}
          />
        ))}
        <NumberField label="Test current (A)" {...form.register("testCurrentA")} error={e("testCurrentA")} />
        <TextField label="Instrument" {...form.register("instrument")} error={e("instrument")} />
        <WhenField {...form.register("measuredAt")} error={e("measuredAt")} />
        <TextField label="Notes" {...form.register("notes")} className="sm:col-span-2" error={e("notes")} />
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
