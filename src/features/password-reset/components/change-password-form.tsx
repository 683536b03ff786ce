import { useRef, useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { changePasswordBody } from "../../../schemas/account";
import { useChangePassword } from "../api";

/** Change one's password while signed in; the current one is asked for first. */
export function ChangePasswordForm({ email }: { email: string }) {
  const change = useChangePassword();
  const form = useRef<HTMLFormElement>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [done, setDone] = useState(false);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const parsed = changePasswordBody.safeParse({
      currentPassword: f.get("currentPassword") ?? "",
      newPassword: f.get("newPassword") ?? "",
    });
    setDone(false);
    setMessage(null);
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setFields({});
    change.mutate(parsed.data, {
      onSuccess: () => {
        form.current?.reset();
        setDone(true);
      },
      onError: (err) => {
        if (err instanceof ApiError) {
          setFields(err.fields);
          setMessage(Object.keys(err.fields).length ? null : err.message);
        } else setMessage("The password was not changed. Try again.");
      },
    });
  }

  return (
    <section aria-labelledby="password-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="password-title" className="text-lg font-semibold">
        Change your password
      </h2>
      <p className="mt-1 text-sm text-mist">
        Every other phone or computer where you are signed in will be signed out, and an e-mail tells you of the change.
      </p>
      <form ref={form} onSubmit={submit} noValidate className="mt-3 grid gap-3 sm:grid-cols-2">
        <input type="hidden" name="username" autoComplete="username" value={email} />
        <TextField
          label="Current password"
          name="currentPassword"
          type="password"
          autoComplete="current-password"
          required
          error={fields.currentPassword}
        />
        <TextField
          label="New password"
          name="newPassword"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
          required
          error={fields.newPassword}
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
