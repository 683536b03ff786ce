/**
 * The one form pattern (DEVELOPERS.md, "Forms"): react-hook-form holds the inputs' text, a zod
 * schema from src/schemas — the one the server parses the request with — validates it through
 * @hookform/resolvers, and a refused save puts the server's field messages beside the same fields.
 *
 * A form's schema is `z.object({ field: <text → value converter> }).pipe(sharedBodySchema)`: the
 * converters below only change text into the body's types (blank → null, "1,5" → 1.5); every limit
 * and message comes from the shared schema, so the form and the server can never disagree.
 */
import { zodResolver } from "@hookform/resolvers/zod";
import {
  useForm,
  type DefaultValues,
  type FieldErrors,
  type FieldValues,
  type Path,
  type UseFormReturn,
} from "react-hook-form";
import { z } from "zod";
import { ApiError } from "./api-client";

/** A number input's text: blank → null, a decimal comma accepted, anything else NaN for zod to name. */
export const numberText = z.string().transform((s) => {
  const t = s.trim().replace(",", ".");
  return t === "" ? null : Number(t);
});

/** A select or text whose blank means "none": "" → null. */
export const blankAsNull = z.string().transform((s) => (s.trim() === "" ? null : s));

/** A datetime-local input ("2026-11-20T09:30", the browser's zone) → ISO 8601; blank or junk stays for zod. */
export const localDateTime = z.string().transform((s) => {
  const d = new Date(s);
  return s && !Number.isNaN(d.getTime()) ? d.toISOString() : s;
});

/** useForm validated by `schema`: In is what the inputs hold (text), Out the request body it parses to. */
export function useSchemaForm<In extends FieldValues, Out>(
  schema: z.ZodType<Out, In>,
  defaultValues: DefaultValues<In>,
) {
  return useForm<In, unknown, Out>({ resolver: zodResolver(schema), defaultValues });
}

/**
 * The server refused a save: its field messages beside the fields of the same name, the rest on top.
 * `fallback` is the message when no answer came (the network failed); `explain` may add to either
 * (e.g. what a multi-step save kept).
 */
export function showSaveError<In extends FieldValues, Out>(
  form: UseFormReturn<In, unknown, Out>,
  err: unknown,
  {
    fallback = "That did not save. Try again.",
    explain = (m: string) => m,
  }: { fallback?: string; explain?: (message: string) => string } = {},
) {
  if (err instanceof ApiError) {
    for (const [k, v] of Object.entries(err.fields ?? {})) form.setError(k as Path<In>, { message: v });
    form.setError("root.server", { message: explain(err.message) });
  } else form.setError("root.server", { message: explain(fallback) });
}

/** The server's message alone (for forms whose field messages speak for themselves). */
export function serverMessage<In extends FieldValues>(errors: FieldErrors<In>): string | null {
  return errors.root?.server?.message ?? null;
}

/** True when some field has a message. */
export function hasFieldErrors<In extends FieldValues>(errors: FieldErrors<In>): boolean {
  return Object.keys(errors).some((k) => k !== "root");
}

/**
 * The form's own message: the server's, or a pointer to the fields marked. `where` the fields are
 * from the message: "below" when it sits at the top of the form, "above" when beside the button.
 */
export function formMessage<In extends FieldValues>(
  errors: FieldErrors<In>,
  where: "above" | "below" = "below",
): string | null {
  if (errors.root?.server?.message) return errors.root.server.message;
  return hasFieldErrors(errors) ? `Check the fields marked ${where}.` : null;
}

/** A field's message, for `error={fieldError(errors, "circuit")}`. */
export function fieldError<In extends FieldValues>(errors: FieldErrors<In>, name: Path<In>): string | undefined {
  const e = name.split(".").reduce<unknown>((o, k) => (o as Record<string, unknown> | undefined)?.[k], errors);
  const m = (e as { message?: unknown } | undefined)?.message;
  return typeof m === "string" ? m : undefined;
}
