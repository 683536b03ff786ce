import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { resetPasswordBody } from "../../../schemas/account";
import { useCompleteReset } from "../api";

export function NewPasswordForm({ token, email, onDone }: { token: string; email: string; onDone: () => void }) {
  const complete = useCompleteReset(token);
  const form = useSchemaForm(resetPasswordBody, { password: "" });
  const errors = form.formState.errors;
  const submit = form.handleSubmit((body) =>
    complete
      .mutateAsync(body.password)
      .then(onDone, (err: unknown) => showSaveError(form, err, { fallback: "That did not work." })),
  );

  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700"
    >
      <p className="text-sm text-mist">
        For <span className="break-all font-semibold text-chalk">{email}</span>. Every other place where you are signed
        in will be signed out.
      </p>
      <input type="hidden" name="username" autoComplete="username" value={email} />
      <TextField
        label="New password"
        {...form.register("password")}
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters."
        required
        error={fieldError(errors, "password") ?? serverMessage(errors) ?? undefined}
      />
      <Button type="submit" className="w-full" disabled={complete.isPending}>
        {complete.isPending ? "Saving…" : "Set the new password"}
      </Button>
    </form>
  );
}
