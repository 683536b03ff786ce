import { useState } from "react";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { ROLE_LABELS, ROLES, type Role } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import { useQueryClient } from "@tanstack/react-query";
import { siteKeys, useMemberMutations, useMembers } from "../../../features/sites/api";
import { InviteForm } from "../../../features/invitations/components/invite-form";
import { PendingInvitations } from "../../../features/invitations/components/pending-invitations";
import { QualifiedPersons } from "../../../features/return-to-service/components/qualified-persons";
import { useSiteContext } from "./site-layout";
import { can } from "../../../domain/permissions";

export default function MembersPage() {
  const { site, role } = useSiteContext();
  // The curator manages the crew; anyone else who arrives here (a hold point's "qualification expired" links here)
  // reads who may sign the energisation, with nothing offered that their role would be refused.
  if (!can(role, "members.manage"))
    return (
      <div className="space-y-6">
        <h1 className="text-2xl font-bold">Crew on {site.name}</h1>
        <p className="text-mist">
          The curator manages the crew: invitations, roles, and who is recorded as a qualified person for energisation.
        </p>
        <QualifiedPersons siteId={site.id} canManage={false} />
      </div>
    );
  return <ManageCrew />;
}

function ManageCrew() {
  const { site } = useSiteContext();
  const members = useMembers(site.id);
  const m = useMemberMutations(site.id);
  const qc = useQueryClient();
  const [error, setError] = useState<string | null>(null);
  const fail = (e: unknown) => setError(e instanceof ApiError ? e.message : "That did not work.");

  return (
    <div className="space-y-6">
      <h1 className="text-2xl font-bold">Crew on {site.name}</h1>
      {error && (
        <p role="alert" className="text-flare-300">
          {error}
        </p>
      )}
      {members.isPending && <Loading />}
      {(members.isLoadingError || serverRefused(members.error)) && <ErrorPanel error={members.error} />}
      <ul className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700">
        {members.data?.map((p) => (
          <li key={p.userId} className="flex flex-wrap items-center gap-3 p-3">
            <span className="min-w-48 flex-1">
              <span className="block font-semibold">{p.name}</span>
              <span className="block text-sm text-mist">{p.email}</span>
              {p.suspended && (
                <span className="block text-sm text-flare-300">
                  Suspended by the instance&apos;s admin: cannot sign in and gets no e-mail
                </span>
              )}
            </span>
            <label className="sr-only" htmlFor={`role-${p.userId}`}>
              Role of {p.name}
            </label>
            <select
              id={`role-${p.userId}`}
              value={p.role}
              className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2"
              onChange={(e) => m.change.mutate({ userId: p.userId, role: e.target.value as Role }, { onError: fail })}
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
            <Button
              tone="quiet"
              onClick={() =>
                confirm(`Remove ${p.name} from ${site.name}?`) && m.remove.mutate(p.userId, { onError: fail })
              }
            >
              Remove
            </Button>
          </li>
        ))}
      </ul>
      <InviteForm siteId={site.id} onSent={() => qc.invalidateQueries({ queryKey: siteKeys.members(site.id) })} />
      <PendingInvitations siteId={site.id} />
      <QualifiedPersons siteId={site.id} canManage />
    </div>
  );
}
