import { useState } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { fieldError, hasFieldErrors, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { changePasswordBody } from "../../../schemas/account";
import { useChangePassword } from "../api";

/** Change one's password while signed in; the current one is asked for first. */
export function ChangePasswordForm({ email }: { email: string }) {
  const change = useChangePassword();
  const form = useSchemaForm(changePasswordBody, { currentPassword: "", newPassword: "" });
  const { register, formState } = form;
  const errors = formState.errors;
  const [done, setDone] = useState(false);
  const submit = form.handleSubmit((body) =>
    change.mutateAsync(body).then(
      () => {
        form.reset();
        setDone(true);
      },
      (err: unknown) => showSaveError(form, err, { fallback: "The password was not changed. Try again." }),
    ),
  );
  // The field messages speak for themselves; the server's own message shows only when no field has one.
  const message = hasFieldErrors(errors) ? null : serverMessage(errors);

  return (
    <section aria-labelledby="password-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="password-title" className="text-lg font-semibold">
        Change your password
      </h2>
      <p className="mt-1 text-sm text-mist">
        Every other phone or computer where you are signed in will be signed out, and an e-mail tells you of the change.
      </p>
      <form
        onSubmit={(ev) => {
          setDone(false);
          void submit(ev);
        }}
        noValidate
        className="mt-3 grid gap-3 sm:grid-cols-2"
      >
        <input type="hidden" name="username" autoComplete="username" value={email} />
        <TextField
          label="Current password"
          {...register("currentPassword")}
          type="password"
          autoComplete="current-password"
          required
          error={fieldError(errors, "currentPassword")}
        />
        <TextField
          label="New password"
          {...register("newPassword")}
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
          required
          error={fieldError(errors, "newPassword")}
        />
        <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
          <Button type="submit" disabled={change.isPending}>
            {change.isPending ? "Changing…" : "Change password"}
          </Button>
          <p role="status" className="text-sm">
            {done && "Password changed. You are still signed in here; everywhere else is signed out."}
          </p>
        </div>
        {message && (
          <p role="alert" className="text-sm text-flare-300 sm:col-span-2">
            {message}
          </p>
        )}
      </form>
    </section>
  );
}
