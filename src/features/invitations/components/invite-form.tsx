import { useState } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { ROLE_LABELS, ROLES, type Role } from "../../../domain/vocab";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { createInvitationBody } from "../../../schemas/invitations";
import { useInvitationMutations } from "../api";

type Note = { ok: boolean; text: string };

/** Invite by e-mail; everyone joins by accepting the link (someone with an account confirms with their password). */
export function InviteForm({ siteId, onSent }: { siteId: string; onSent: () => void }) {
  const { create } = useInvitationMutations(siteId);
  const form = useSchemaForm(createInvitationBody, { email: "", role: "volunteer" });
  const { register, formState } = form;
  const errors = formState.errors;
  const [note, setNote] = useState<Note | null>(null);

  const submit = form.handleSubmit((body) => {
    setNote(null);
    return create.mutateAsync(body).then(
      (d) => {
        form.reset();
        onSent();
        if (d.invitation?.sendStatus === "sent") setNote({ ok: true, text: `Invitation sent to ${body.email}.` });
        else if (d.invitation?.sendStatus === "pending")
          setNote({
            ok: true,
            text: `Invitation to ${body.email} saved; its e-mail is on its way (the list below says when it has gone).`,
          });
        else
          setNote({
            ok: false,
            text: `The invitation for ${body.email} is saved, but the e-mail was not sent. Try Resend below.`,
          });
      },
      (err: unknown) => showSaveError(form, err, { fallback: "The invitation could not be saved." }),
    );
  });
  const failure = serverMessage(errors);

  return (
    <form
      onSubmit={(ev) => void submit(ev)}
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
          {...register("email")}
          type="email"
          inputMode="email"
          autoComplete="off"
          required
          error={fieldError(errors, "email")}
        />
        <SelectField label="Role on this site" {...register("role")} error={fieldError(errors, "role")}>
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
      {failure && (
        <p role="alert" className="text-flare-300">
          ⚠ {failure}
        </p>
      )}
      {note && (
        <p role={note.ok ? "status" : "alert"} className={note.ok ? "text-kelp-300" : "text-flare-300"}>
          {note.ok ? "✓ " : "⚠ "}
          {note.text}
        </p>
      )}
    </form>
  );
}
