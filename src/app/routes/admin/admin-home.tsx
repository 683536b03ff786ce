import { useState, type ReactNode } from "react";
import type { FieldValues, UseFormReturn } from "react-hook-form";
import { Link, Navigate } from "react-router";
import { paths } from "../../../config/paths";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { useSession } from "../../../features/auth/api";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { ROLE_LABELS } from "../../../domain/vocab";
import { useAccounts, useCreateSite, useCreateUser, useAccountStanding } from "../../../features/sites/api";
import { stamp } from "../../../lib/clock";
import { createSiteBody, createUserBody, suspendAccountBody, type Account } from "../../../schemas/sites";

/**
 * One of the admin's forms, open only when asked for: it saves, empties itself (for the next one) and says what it
 * made; a refusal goes beside the fields. Close puts it away.
 */
function AdminForm<In extends FieldValues, Out, Made>({
  form,
  title,
  save,
  said,
  onDone,
  onClose,
  submitLabel,
  pending,
  children,
}: {
  form: UseFormReturn<In, unknown, Out>;
  title: string;
  submitLabel: string;
  pending: boolean;
  save: (body: Out) => Promise<Made>;
  said: (made: Made) => string;
  onDone: (text: string) => void;
  onClose: () => void;
  children: ReactNode;
}) {
  const submit = form.handleSubmit((body) =>
    save(body).then(
      (made) => {
        form.reset();
        onDone(said(made));
      },
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    ),
  );
  const message = formMessage(form.formState.errors);
  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 className="text-lg font-semibold">{title}</h2>
      {message && (
        <p role="alert" className="text-flare-300">
          {message}
        </p>
      )}
      {children}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={pending}>
          {submitLabel}
        </Button>
        <Button tone="quiet" onClick={onClose}>
          Close
        </Button>
      </div>
    </form>
  );
}

/** A new site; createSiteBody (the server's own schema) validates it. */
function NewSiteForm({ onDone, onClose }: { onDone: (text: string) => void; onClose: () => void }) {
  const createSite = useCreateSite();
  const form = useSchemaForm(createSiteBody, { name: "", kind: "vessel", location: "" });
  const { register, formState } = form;
  const errors = formState.errors;
  return (
    <AdminForm
      form={form}
      title="New site"
      save={(b) => createSite.mutateAsync(b)}
      said={(s) => `Site “${s.name}” created.`}
      onDone={onDone}
      onClose={onClose}
      submitLabel="Create site"
      pending={createSite.isPending}
    >
      <TextField label="Name" {...register("name")} required error={fieldError(errors, "name")} />
      <SelectField label="Kind" {...register("kind")} error={fieldError(errors, "kind")}>
        <option value="vessel">Vessel</option>
        <option value="building">Building</option>
        <option value="plant">Plant</option>
      </SelectField>
      <TextField label="Location" {...register("location")} error={fieldError(errors, "location")} />
    </AdminForm>
  );
}

/** A new account; createUserBody (the server's own schema) validates it. */
function NewAccountForm({ onDone, onClose }: { onDone: (text: string) => void; onClose: () => void }) {
  const createUser = useCreateUser();
  const form = useSchemaForm(createUserBody, { email: "", name: "", password: "", isAdmin: false });
  const { register, formState } = form;
  const errors = formState.errors;
  return (
    <AdminForm
      form={form}
      title="New account"
      save={(b) => createUser.mutateAsync(b)}
      said={(d) => `Account ${d.user.email} created.`}
      onDone={onDone}
      onClose={onClose}
      submitLabel="Create account"
      pending={createUser.isPending}
    >
      <TextField label="E-mail" {...register("email")} type="email" required error={fieldError(errors, "email")} />
      <TextField label="Name" {...register("name")} required error={fieldError(errors, "name")} />
      <TextField
        label="Password"
        {...register("password")}
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters"
        required
        error={fieldError(errors, "password")}
      />
      <label className="flex min-h-11 items-center gap-2">
        <input type="checkbox" {...register("isAdmin")} className="h-5 w-5" /> Instance admin
      </label>
    </AdminForm>
  );
}

export default function AdminHome() {
  const session = useSession();
  // What the last save made (each form says its own refusals beside its fields).
  const [done, setDone] = useState<string | null>(null);
  // The forms open when asked for: an admin acting on a lost phone finds the account list first, not two forms.
  const [making, setMaking] = useState<"site" | "account" | null>(null);
  if (session.data && !session.data.user.isAdmin) return <Navigate to="/" replace />;
  return (
    <main id="main" className="mx-auto max-w-3xl space-y-6 p-4">
      <h1 className="text-2xl font-bold">Instance administration</h1>
      <p>
        <Link to={paths.mailbox.href()} className="underline">
          Local mailbox
        </Link>{" "}
        <span className="text-mist">— e-mail kept by the fake mail server when SMTP_URL is unset</span>
      </p>
      {done && (
        <p role="status" className="text-kelp-300">
          {done}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button
          tone={making === "site" ? "primary" : "quiet"}
          aria-expanded={making === "site"}
          onClick={() => setMaking(making === "site" ? null : "site")}
        >
          New site…
        </Button>
        <Button
          tone={making === "account" ? "primary" : "quiet"}
          aria-expanded={making === "account"}
          onClick={() => setMaking(making === "account" ? null : "account")}
        >
          New account…
        </Button>
      </div>
      {making === "site" && <NewSiteForm onDone={setDone} onClose={() => setMaking(null)} />}
      {making === "account" && <NewAccountForm onDone={setDone} onClose={() => setMaking(null)} />}
      {/* Read once the session says admin: no refused read while a non-admin is sent away. */}
      {session.data?.user.isAdmin && <Accounts selfId={session.data.user.id} />}
    </main>
  );
}

/** Who has an account here, with each site and role: to see who can sign in before adding someone twice. */
function Accounts({ selfId }: { selfId: string }) {
  const accounts = useAccounts();
  // A yard's instance holds hundreds of accounts: find one by name, e-mail or site, or list the suspended.
  const [find, setFind] = useState("");
  const [suspendedOnly, setSuspendedOnly] = useState(false);
  const words = find.trim().toLowerCase().split(/\s+/).filter(Boolean);
  const shown = (accounts.data ?? []).filter((a) => {
    if (suspendedOnly && !a.suspended) return false;
    const text = [a.name, a.email, ...a.sites.map((m) => m.siteName)].join(" ").toLowerCase();
    return words.every((w) => text.includes(w));
  });
  const suspendedCount = (accounts.data ?? []).filter((a) => a.suspended).length;
  return (
    <section aria-labelledby="accounts-heading" className="space-y-2">
      <h2 id="accounts-heading" className="text-lg font-semibold">
        Accounts on this instance{accounts.data ? ` (${accounts.data.length})` : ""}
      </h2>
      <p className="text-sm text-mist">
        A curator brings an account onto a site by inviting its e-mail from the site&apos;s crew page. Suspend an
        account when someone leaves the crew or loses a phone that is signed in: it is signed out everywhere at once,
        cannot sign in, reset its password or accept an invitation, and gets no e-mail, while everything it recorded
        keeps its name. Reinstate it to let it back in.
      </p>
      {accounts.isPending && <Loading what="Reading the accounts" />}
      {(accounts.isLoadingError || serverRefused(accounts.error)) && <ErrorPanel error={accounts.error} />}
      {accounts.data && (
        <>
          <div className="flex flex-wrap items-end gap-3">
            <TextField
              label="Find an account"
              type="search"
              value={find}
              onChange={(e) => setFind(e.target.value)}
              hint="Name, e-mail or site"
              className="min-w-56 flex-1"
            />
            <label className="flex min-h-11 items-center gap-2">
              <input
                type="checkbox"
                checked={suspendedOnly}
                onChange={(e) => setSuspendedOnly(e.target.checked)}
                className="h-5 w-5"
              />
              Suspended only ({suspendedCount})
            </label>
          </div>
          {shown.length < accounts.data.length && (
            <p className="text-sm text-mist" aria-live="polite">
              {shown.length} of {accounts.data.length} accounts shown.
            </p>
          )}
          {shown.length > 0 ? (
            <ul className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700">
              {shown.map((a) => (
                <AccountRow key={a.id} account={a} isSelf={a.id === selfId} />
              ))}
            </ul>
          ) : (
            <p className="rounded-lg bg-hull-850 p-3 ring-1 ring-hull-700">No account matches.</p>
          )}
        </>
      )}
    </section>
  );
}

/** One account: who, their sites, and whether it is suspended (by whom, when, why), with the admin's controls. */
function AccountRow({ account: a, isSelf }: { account: Account; isSelf: boolean }) {
  const { suspend, reinstate, setAdmin } = useAccountStanding();
  const [asking, setAsking] = useState(false);
  return (
    <li className="space-y-2 p-3" data-testid="account">
      <p className="flex flex-wrap items-baseline gap-x-3">
        <span className={`font-semibold ${a.suspended ? "text-mist line-through" : ""}`}>{a.name}</span>
        <span className="text-sm break-all text-mist">{a.email}</span>
        {a.isAdmin && <span className="rounded-sm bg-hull-700 px-1.5 text-xs text-chalk">Instance admin</span>}
        {isSelf && <span className="text-xs text-mist">(you)</span>}
      </p>
      <p className="text-sm text-mist">
        {a.sites.length
          ? a.sites.map((m) => `${m.siteName}: ${ROLE_LABELS[m.role].toLowerCase()}`).join(" · ")
          : a.isAdmin
            ? "Acts as curator on every site"
            : "No site yet"}
      </p>
      {a.suspended && (
        <p className="rounded-md bg-flare-700/30 p-2 text-sm ring-1 ring-flare-400">
          <strong>Suspended</strong> {stamp(a.suspended.at)}
          {a.suspended.byName ? ` by ${a.suspended.byName}` : ""}: {a.suspended.reason}
        </p>
      )}
      {reinstate.error && reinstate.variables === a.id && (
        <p role="alert" className="text-sm text-flare-300">
          {reinstate.error.message}
        </p>
      )}
      {setAdmin.error && setAdmin.variables?.userId === a.id && (
        <p role="alert" className="text-sm text-flare-300">
          {setAdmin.error.message}
        </p>
      )}
      {!isSelf && !asking && (
        <div className="flex flex-wrap gap-2">
          {a.suspended ? (
            <Button
              tone="quiet"
              disabled={reinstate.isPending}
              onClick={() => reinstate.mutate(a.id)}
              aria-label={`Reinstate ${a.name}`}
            >
              Reinstate
            </Button>
          ) : (
            <Button tone="quiet" onClick={() => setAsking(true)} aria-label={`Suspend ${a.name}…`}>
              Suspend…
            </Button>
          )}
          {/* Not made an admin while suspended (the server refuses it too): reinstate first. */}
          {(a.isAdmin || !a.suspended) && (
            <Button
              tone="quiet"
              disabled={setAdmin.isPending}
              onClick={() =>
                confirm(
                  a.isAdmin
                    ? `Take instance admin away from ${a.name}? They keep their sites and roles.`
                    : `Make ${a.name} an instance admin? They will act as curator on every site and manage accounts.`,
                ) && setAdmin.mutate({ userId: a.id, isAdmin: !a.isAdmin })
              }
            >
              {a.isAdmin ? "Remove instance admin" : "Make instance admin"}
            </Button>
          )}
        </div>
      )}
      {asking && <SuspendForm account={a} suspend={suspend} onDone={() => setAsking(false)} />}
    </li>
  );
}

/** The reason asked for before an account is suspended: a form only while it is open, not one for every row. */
function SuspendForm({
  account: a,
  suspend,
  onDone,
}: {
  account: Account;
  suspend: ReturnType<typeof useAccountStanding>["suspend"];
  onDone: () => void;
}) {
  const form = useSchemaForm(suspendAccountBody, { reason: "" });
  const errors = form.formState.errors;
  const message = formMessage(errors, "above");
  const submit = form.handleSubmit((b) =>
    suspend.mutateAsync({ userId: a.id, reason: b.reason }).then(
      () => onDone(),
      (err: unknown) => showSaveError(form, err, { fallback: "Not suspended: no answer from the server. Try again." }),
    ),
  );
  return (
    <form
      onSubmit={(ev) => void submit(ev)}
      noValidate
      aria-label={`Suspend ${a.name}`}
      className="space-y-2 rounded-md bg-hull-800 p-3 ring-1 ring-hull-600"
    >
      <TextArea
        label="Why (kept with the account and in the audit log)"
        {...form.register("reason")}
        rows={2}
        required
        error={fieldError(errors, "reason")}
      />
      {message && (
        <p role="alert" className="text-sm text-flare-300">
          {message}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" tone="danger" disabled={suspend.isPending}>
          Suspend and sign out everywhere
        </Button>
        <Button tone="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
