import { useEffect, type ComponentProps, type ReactNode } from "react";
import type { FieldValues, Path, PathValue, UseFormReturn } from "react-hook-form";
import { SelectField, TextField } from "../../../components/field";
import { localNow } from "../format";

export interface TargetOption {
  componentId: string;
  /** The position it sits in, where its photos are filed (when the page knows it). */
  positionId?: string;
  designation: string;
  circuit: string;
}

export function FormShell({
  title,
  onSubmit,
  error,
  children,
  busy,
  submitLabel,
  disabled = false,
}: {
  title: string;
  onSubmit: (e: React.FormEvent<HTMLFormElement>) => void;
  error: string | null;
  children: ReactNode;
  busy: boolean;
  submitLabel: string;
  disabled?: boolean;
}) {
  return (
    <form
      onSubmit={onSubmit}
      noValidate
      aria-label={title}
      className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h3 className="text-lg font-bold">{title}</h3>
      {error && (
        <p role="alert" className="rounded-md bg-flare-700/30 p-2 text-flare-300">
          {error}
        </p>
      )}
      <div className="grid gap-3 sm:grid-cols-2">{children}</div>
      <button
        type="submit"
        disabled={busy || disabled}
        className="min-h-11 w-full rounded-md bg-brass-400 px-4 font-semibold text-hull-950 hover:bg-brass-300 disabled:bg-hull-600 sm:w-auto"
      >
        {busy ? "Saving…" : submitLabel}
      </button>
    </form>
  );
}

/**
 * A reading saved with no signal: it waits on this phone (src/lib/outbox) and is sent by itself.
 * Its verdict, and any incident a live stage would raise from it, come from the server on arrival,
 * so a reading that looks dangerous must be acted on now, in person.
 */
export function KeptOnPhone({ what }: { what: string }) {
  return (
    <div role="status" className="rounded-md border-2 border-tide-300 bg-hull-850 p-3" data-testid="reading-pending">
      <p className="font-semibold text-tide-300">
        {what} kept on this phone: no signal. It is sent by itself when the connection returns.
      </p>
      <p className="mt-1 text-sm text-mist">
        Its verdict shows once the server has it. If what you measured looks wrong or dangerous, act on it now and tell
        the qualified person in person: nothing is raised from it until it arrives.
      </p>
    </div>
  );
}

/**
 * Keeps "Measured at" on the clock while nobody has typed in it: a form left open at the board (or kept for the next
 * reading after a save) otherwise stamps every reading with the minute the page was opened. A time the person typed
 * stays as typed.
 */
export function useFreshWhen<V extends FieldValues & { measuredAt: string }>(form: UseFormReturn<V, unknown, unknown>) {
  useEffect(() => {
    const name = "measuredAt" as Path<V>;
    const tick = () => {
      if (!form.getFieldState(name).isDirty)
        form.setValue(name, localNow() as PathValue<V, Path<V>>, { shouldDirty: false });
    };
    const timer = setInterval(tick, 15_000);
    return () => clearInterval(timer);
  }, [form]);
}

/** When the reading was taken: `{...register("measuredAt")}`, its default `localNow()` in the form's defaults. */
export function WhenField({ error, ...rest }: { error?: string } & ComponentProps<"input">) {
  return <TextField label="Measured at" type="datetime-local" required error={error} {...rest} />;
}

export function NumberField({
  label,
  error,
  hint,
  step = "any",
  ...rest
}: {
  label: string;
  name: string;
  error?: string;
  hint?: string;
  step?: string;
} & Omit<ComponentProps<"input">, "type" | "step">) {
  return <TextField label={label} type="number" inputMode="decimal" step={step} error={error} hint={hint} {...rest} />;
}

/** The component a reading is taken on: `{...register("componentId")}`, its default in the form's defaults. */
export function ComponentSelect({
  options,
  label = "Component",
  error,
  allowNone,
  ...rest
}: {
  options: TargetOption[];
  label?: string;
  error?: string;
  allowNone?: string;
} & ComponentProps<"select">) {
  return (
    <SelectField label={label} error={error} {...rest}>
      {allowNone && <option value="">{allowNone}</option>}
      {options.map((o) => (
        <option key={o.componentId} value={o.componentId}>
          {o.designation}
          {o.circuit && ` · ${o.circuit}`}
        </option>
      ))}
    </SelectField>
  );
}

/** How the meter showed a value: exactly, at or above its top of range (">2000"), or below its resolution. */
export function QualifierField({
  label,
  error,
  ...rest
}: { name: string; label: string; error?: string } & ComponentProps<"select">) {
  return (
    <SelectField label={label} error={error} {...rest}>
      <option value="">As shown (exact)</option>
      <option value="at_or_above">At or above the meter's limit (≥)</option>
      <option value="below">Below the meter's resolution (≤)</option>
    </SelectField>
  );
}
