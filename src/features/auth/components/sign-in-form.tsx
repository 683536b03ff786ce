import { useState, type FormEvent } from "react";
import { useNavigate } from "react-router";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { signInBody } from "../../../schemas/auth";
import { useSignIn } from "../api";

export function SignInForm({ next }: { next: string }) {
  const signIn = useSignIn();
  const navigate = useNavigate();
  const [fields, setFields] = useState<Record<string, string>>({});

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const parsed = signInBody.safeParse({ email: form.get("email"), password: form.get("password") });
    if (!parsed.success) {
      setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setFields({});
    signIn.mutate(parsed.data, { onSuccess: () => navigate(next, { replace: true }) });
  }

  const failure = signIn.error instanceof ApiError ? signIn.error.message : signIn.error ? "Signing in failed." : null;
  return (
    <form onSubmit={submit} noValidate className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
      <TextField
        label="E-mail"
        name="email"
        type="email"
        autoComplete="username"
        inputMode="email"
        required
        error={fields.email}
      />
      <TextField
        label="Password"
        name="password"
        type="password"
        autoComplete="current-password"
        required
        error={fields.password}
      />
      {failure && (
        <p role="alert" className="text-sm text-flare-300">
          {failure}
        </p>
      )}
      <Button type="submit" className="w-full" disabled={signIn.isPending}>
        {signIn.isPending ? "Signing in…" : "Sign in"}
      </Button>
    </form>
  );
}
