import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { resetRequestBody } from "../../../schemas/account";
import { useRequestReset } from "../api";

/** Always the same answer after sending, so the page never tells whether an account exists. */
export function ResetRequestForm() {
  const request = useRequestReset();
  const [error, setError] = useState<string | undefined>();

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const parsed = resetRequestBody.safeParse({ email: new FormData(e.currentTarget).get("email") });
    if (!parsed.success) return setError(parsed.error.issues[0]?.message);
    setError(undefined);
    request.mutate(parsed.data.email);
  }

  if (request.data)
    return (
      <p role="status" className="rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
        ✉ {request.data.message}
      </p>
    );
  const failure =
    request.error instanceof ApiError ? request.error.message : request.error ? "That did not work. Try again." : null;
  return (
    <form onSubmit={submit} noValidate className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
      <TextField
        label="E-mail"
        name="email"
        type="email"
        autoComplete="username"
        inputMode="email"
        required
        error={error}
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
