import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ROLE_LABELS } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { acceptExistingAccountBody, acceptNewAccountBody, type InvitationPreview } from "../../../schemas/invitations";
import { useAcceptInvitation } from "../api";

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
  const [fields, setFields] = useState<Record<string, string>>({});
  const existing = invitation.accountExists;

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const raw = { name: f.get("name") ?? undefined, password: f.get("password") };
    const parsed = existing ? acceptExistingAccountBody.safeParse(raw) : acceptNewAccountBody.safeParse(raw);
    if (!parsed.success)
      return setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
    setFields({});
    accept.mutate(parsed.data, {
      onSuccess: (d) => onAccepted(d.siteId),
      onError: (err) => err instanceof ApiError && setFields(err.fields),
    });
  }

  const failure =
    accept.error instanceof ApiError ? accept.error.message : accept.error ? "Joining failed. Try again." : null;
  return (
    <form onSubmit={submit} noValidate className="space-y-4 rounded-lg bg-hull-850 p-5 ring-1 ring-hull-700">
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
          name="name"
          autoComplete="name"
          required
          error={fields.name}
        />
      )}
      <input type="hidden" name="username" autoComplete="username" value={invitation.email} />
      <TextField
        label={existing ? "Password" : "Choose a password"}
        name="password"
        type="password"
        autoComplete={existing ? "current-password" : "new-password"}
        hint={existing ? undefined : "At least 10 characters. A short sentence is easy to remember."}
        required
        error={fields.password}
      />
      {failure && !Object.keys(fields).length && (
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
