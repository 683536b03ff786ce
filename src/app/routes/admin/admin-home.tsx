import { useState, type FormEvent } from "react";
import { Link, Navigate } from "react-router";
import { paths } from "../../../config/paths";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { useSession } from "../../../features/auth/api";
import { useCreateSite, useCreateUser } from "../../../features/sites/api";

export default function AdminHome() {
  const session = useSession();
  const createSite = useCreateSite();
  const createUser = useCreateUser();
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  if (session.data && !session.data.user.isAdmin) return <Navigate to="/" replace />;
  const fail = (e: unknown) => setMsg({ ok: false, text: e instanceof ApiError ? e.message : "That did not work." });

  function site(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    createSite.mutate(
      { name: String(f.get("name")), kind: f.get("kind") as "vessel", location: String(f.get("location") ?? "") },
      { onSuccess: (s) => setMsg({ ok: true, text: `Site “${s.name}” created.` }), onError: fail },
    );
  }
  function user(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    createUser.mutate(
      {
        email: String(f.get("email")),
        name: String(f.get("name")),
        password: String(f.get("password")),
        isAdmin: f.get("isAdmin") === "on",
      },
      { onSuccess: (d) => setMsg({ ok: true, text: `Account ${d.user.email} created.` }), onError: fail },
    );
  }
  return (
    <main id="main" className="mx-auto max-w-3xl space-y-6 p-4">
      <h1 className="text-2xl font-bold">Instance administration</h1>
      <p>
        <Link to={paths.mailbox.href()}>Local mailbox</Link>{" "}
        <span className="text-mist">— e-mail kept by the fake mail server when SMTP_URL is unset</span>
      </p>
      {msg && (
        <p role={msg.ok ? "status" : "alert"} className={msg.ok ? "text-kelp-300" : "text-flare-300"}>
          {msg.text}
        </p>
      )}
      <form onSubmit={site} className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
        <h2 className="text-lg font-semibold">New site</h2>
        <TextField label="Name" name="name" required />
        <SelectField label="Kind" name="kind" defaultValue="vessel">
          <option value="vessel">Vessel</option>
          <option value="building">Building</option>
          <option value="plant">Plant</option>
        </SelectField>
        <TextField label="Location" name="location" />
        <Button type="submit" disabled={createSite.isPending}>
          Create site
        </Button>
      </form>
      <form onSubmit={user} className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
        <h2 className="text-lg font-semibold">New account</h2>
        <TextField label="E-mail" name="email" type="email" required />
        <TextField label="Name" name="name" required />
        <TextField
          label="Password"
          name="password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters"
          required
        />
        <label className="flex min-h-11 items-center gap-2">
          <input type="checkbox" name="isAdmin" className="h-5 w-5" /> Instance admin
        </label>
        <Button type="submit" disabled={createUser.isPending}>
          Create account
        </Button>
      </form>
    </main>
  );
}
