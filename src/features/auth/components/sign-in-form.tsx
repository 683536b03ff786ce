import { useNavigate } from "react-router";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { signInBody } from "../../../schemas/auth";
import { useSignIn } from "../api";

export function SignInForm({ next }: { next: string }) {
  const signIn = useSignIn();
  const navigate = useNavigate();
  const form = useSchemaForm(signInBody, { email: "", password: "" });
  const { register, formState } = form;
  const errors = formState.errors;
  const submit = form.handleSubmit((body) =>
    signIn.mutateAsync(body).then(
      () => navigate(next, { replace: true }),
      (err: unknown) => showSaveError(form, err, { fallback: "Signing in failed." }),
    ),
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
        {...register("email")}
        type="email"
        autoComplete="username"
        inputMode="email"
        required
        error={fieldError(errors, "email")}
      />
      <TextField
        label="Password"
        {...register("password")}
        type="password"
        autoComplete="current-password"
        required
        error={fieldError(errors, "password")}
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
