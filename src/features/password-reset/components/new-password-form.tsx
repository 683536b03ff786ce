import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { resetPasswordBody } from "../../../schemas/account";
import { useCompleteReset } from "../api";

export function NewPasswordForm({ token, email, onDone }: { token: string; email: string; onDone: () => void }) {
  const complete = useCompleteReset(token);
  const [error, setError] = useState<string | undefined>();

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const parsed = resetPasswordBody.safeParse({ password: new FormData(e.currentTarget).get("password") });
    if (!parsed.success) return setError(parsed.error.issues[0]?.message);
    setError(undefined);
    complete.mutate(parsed.data.password, {
      onSuccess: onDone,
      onError: (err) => setError(err instanceof ApiError ? err.message : "That did not work."),
    });
  }

  return (
    <form onSubmit={submit} noValidate className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
      <p className="text-sm text-mist">
        For <span className="break-all font-semibold text-chalk">{email}</span>. Every other place where you are signed
        in will be signed out.
      </p>
      <input type="hidden" name="username" autoComplete="username" value={email} />
      <TextField
        label="New password"
        name="password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters."
        required
        error={error}
      />
      <Button type="submit" className="w-full" disabled={complete.isPending}>
        {complete.isPending ? "Saving…" : "Set the new password"}
      </Button>
    </form>
  );
}
