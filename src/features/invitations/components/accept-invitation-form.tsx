import { z } from "zod";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ROLE_LABELS } from "../../../domain/vocab";
import { fieldError, hasFieldErrors, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { acceptExistingAccountBody, acceptNewAccountBody, type InvitationPreview } from "../../../schemas/invitations";
import { useAcceptInvitation } from "../api";

/** A newcomer gives a name and a new password; an existing account only its password. */
const acceptForm = (existing: boolean) =>
  existing
    ? z
        .object({ name: z.string(), password: z.string() })
        .transform(({ password }) => ({ password }))
        .pipe(acceptExistingAccountBody)
    : z.object({ name: z.string(), password: z.string() }).pipe(acceptNewAccountBody);

/**
 * A new address chooses a name and password; an address that already has an account
 * proves it with that account's password. Either way the invitee ends up signed in.
 */
export function AcceptInvitationForm({
  token,
  invitation,
  onAccepted,
}: {
  token: string;
  invitation: InvitationPreview;
  onAccepted: (siteId: string) => void;
}) {
  const accept = useAcceptInvitation(token);
  const existing = invitation.accountExists;
  const form = useSchemaForm<{ name: string; password: string }, { name?: string; password: string }>(
    acceptForm(existing),
    { name: "", password: "" },
  );
  const { register, formState } = form;
  const errors = formState.errors;
  const submit = form.handleSubmit((body) =>
    accept.mutateAsync(body).then(
      (d) => onAccepted(d.siteId),
      (err: unknown) => showSaveError(form, err, { fallback: "Joining failed. Try again." }),
    ),
  );

  const failure = hasFieldErrors(errors) ? null : serverMessage(errors);
  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700"
    >
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-mist">Site</dt>
        <dd className="font-semibold">{invitation.siteName}</dd>
        <dt className="text-mist">Your role</dt>
        <dd className="font-semibold">{ROLE_LABELS[invitation.role]}</dd>
        <dt className="text-mist">E-mail</dt>
        <dd className="break-all">{invitation.email}</dd>
      </dl>
      {existing ? (
        <p className="text-sm text-mist">
          This address already has a Tideline account. Enter its password to join the crew.
        </p>
      ) : (
        <TextField
          label="Your name, as the crew knows you"
          {...register("name")}
          autoComplete="name"
          required
          error={fieldError(errors, "name")}
        />
      )}
      <input type="hidden" name="username" autoComplete="username" value={invitation.email} />
      <TextField
        label={existing ? "Password" : "Choose a password"}
        {...register("password")}
        type="password"
        autoComplete={existing ? "current-password" : "new-password"}
        hint={existing ? undefined : "At least 10 characters. A short sentence is easy to remember."}
        required
        error={fieldError(errors, "password")}
      />
      {failure && (
        <p role="alert" className="text-sm text-flare-300">
          {failure}
        </p>
      )}
      <Button type="submit" className="w-full" disabled={accept.isPending}>
        {accept.isPending ? "Joining…" : existing ? "Sign in and join" : "Join the crew"}
      </Button>
    </form>
  );
}
