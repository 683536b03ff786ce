import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { ErrorPanel, Loading } from "../../../components/status";
import { ROLE_LABELS, ROLES, type Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useMemberMutations, useMembers } from "../../../features/sites/api";
import { useSiteContext } from "./site-layout";

export default function MembersPage() {
  const { site } = useSiteContext();
  const members = useMembers(site.id);
  const m = useMemberMutations(site.id);
  const [error, setError] = useState<string | null>(null);
  const fail = (e: unknown) => setError(e instanceof ApiError ? e.message : "That did not work.");

  function add(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const form = e.currentTarget;
    setError(null);
    m.add.mutate({ email: String(f.get("email")), role: f.get("role") as Role }, { onSuccess: () => form.reset(), onError: fail });
  }

  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-bold">Crew on {site.name}</h1>
      {error && <p role="alert" className="text-flare-300">{error}</p>}
      {members.isPending && <Loading />}
      {members.isError && <ErrorPanel error={members.error} />}
      <ul className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700">
        {members.data?.map((p) => (
          <li key={p.userId} className="flex flex-wrap items-center gap-3 p-3">
            <span className="min-w-48 flex-1">
              <span className="block font-semibold">{p.name}</span>
              <span className="block text-sm text-mist">{p.email}</span>
            </span>
            <label className="sr-only" htmlFor={`role-${p.userId}`}>Role of {p.name}</label>
            <select
              id={`role-${p.userId}`}
              value={p.role}
              className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2"
              onChange={(e) => m.change.mutate({ userId: p.userId, role: e.target.value as Role }, { onError: fail })}
            >
              {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
            </select>
            <Button tone="quiet" onClick={() => confirm(`Remove ${p.name} from ${site.name}?`) && m.remove.mutate(p.userId, { onError: fail })}>
              Remove
            </Button>
          </li>
        ))}
      </ul>
      <form onSubmit={add} className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-[1fr_14rem_auto] sm:items-end">
        <TextField label="E-mail of an existing account" name="email" type="email" required />
        <SelectField label="Role" name="role" defaultValue="volunteer">
          {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
        </SelectField>
        <Button type="submit" disabled={m.add.isPending}>Add to crew</Button>
      </form>
    </div>
  );
}
