import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { resetRequestBody } from "../../../schemas/account";
import { useRequestReset } from "../api";

/** Always the same answer after sending, so the page never tells whether an account exists. */
export function ResetRequestForm() {
  const request = useRequestReset();
  const form = useSchemaForm(resetRequestBody, { email: "" });
  const errors = form.formState.errors;
  const submit = form.handleSubmit((body) =>
    request
      .mutateAsync(body.email)
      .then(undefined, (err: unknown) => showSaveError(form, err, { fallback: "That did not work. Try again." })),
  );

  if (request.data)
    return (
      <p role="status" className="rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
        ✉ {request.data.message}
      </p>
    );
  const failure = serverMessage(errors);
  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700"
    >
      <TextField
        label="E-mail"
        {...form.register("email")}
        type="email"
        autoComplete="username"
        inputMode="email"
        required
        error={fieldError(errors, "email")}
      />
      {failure && (
        <p role="alert" className="text-sm text-flare-300">
          {failure}
        </p>
      )}
      <Button type="submit" className="w-full" disabled={request.isPending}>
        {request.isPending ? "Sending…" : "Send me a link"}
      </Button>
    </form>
  );
}
