import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { ROLE_LABELS, ROLES, type Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { createInvitationBody } from "../../../schemas/invitations";
import { useInvitationMutations } from "../api";

type Note = { ok: boolean; text: string };

/** Invite by e-mail; everyone joins by accepting the link (someone with an account confirms with their password). */
export function InviteForm({ siteId, onSent }: { siteId: string; onSent: () => void }) {
  const { create } = useInvitationMutations(siteId);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [note, setNote] = useState<Note | null>(null);

  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const parsed = createInvitationBody.safeParse({ email: f.get("email"), role: f.get("role") });
    if (!parsed.success)
      return setFields(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
    setFields({});
    setNote(null);
    create.mutate(parsed.data, {
      onSuccess: (d) => {
        form.reset();
        onSent();
        if (d.invitation?.sendStatus === "sent")
          setNote({ ok: true, text: `Invitation sent to ${parsed.data.email}.` });
        else if (d.invitation?.sendStatus === "pending")
          setNote({
            ok: true,
            text: `Invitation to ${parsed.data.email} saved; its e-mail is on its way (the list below says when it has gone).`,
          });
        else
          setNote({
            ok: false,
            text: `The invitation for ${parsed.data.email} is saved, but the e-mail was not sent. Try Resend below.`,
          });
      },
      onError: (err) => {
        if (err instanceof ApiError && Object.keys(err.fields).length) setFields(err.fields);
        setNote({ ok: false, text: err instanceof ApiError ? err.message : "The invitation could not be saved." });
      },
    });
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      aria-labelledby="invite-title"
      className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 id="invite-title" className="text-lg font-semibold">
        Invite someone
      </h2>
      <p className="text-sm text-mist">
        They get an e-mail with a link that works once, for 7 days. They join the crew when they accept it: newcomers
        choose a name and password, people with an account confirm theirs.
      </p>
      <div className="grid gap-3 sm:grid-cols-[1fr_14rem_auto] sm:items-end">
        <TextField
          label="E-mail"
          name="email"
          type="email"
          inputMode="email"
          autoComplete="off"
          required
          error={fields.email}
        />
        <SelectField label="Role on this site" name="role" defaultValue="volunteer" error={fields.role}>
          {ROLES.map((r: Role) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </SelectField>
        <Button type="submit" disabled={create.isPending}>
          {create.isPending ? "Sending…" : "Send invitation"}
        </Button>
      </div>
      {note && (
        <p role={note.ok ? "status" : "alert"} className={note.ok ? "text-kelp-300" : "text-flare-300"}>
          {note.ok ? "✓ " : "⚠ "}
          {note.text}
        </p>
      )}
    </form>
  );
}
