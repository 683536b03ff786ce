import { useState } from "react";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { ROLE_LABELS } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { Invitation } from "../../../schemas/invitations";
import { useInvitationMutations, useInvitations } from "../api";
import { dateOf as day } from "../../../lib/clock";

/** State in words and a glyph, never by colour alone. */
function SendState({ inv }: { inv: Invitation }) {
  if (inv.expired)
    return <span className="rounded bg-hull-700 px-2 py-0.5 text-sm">⌛ Expired {day(inv.expiresAt)}</span>;
  if (inv.sendStatus === "failed")
    return (
      <span className="rounded bg-flare-700/40 px-2 py-0.5 text-sm text-flare-300 ring-1 ring-flare-400">
        ⚠ Not sent — {inv.sendError ?? "the mail server did not take it; try Resend"}
      </span>
    );
  if (inv.sendStatus === "pending") return <span className="rounded bg-hull-700 px-2 py-0.5 text-sm">… Sending</span>;
  return (
    <span className="rounded bg-kelp-700/40 px-2 py-0.5 text-sm text-kelp-300">
      ✓ Sent {inv.lastSentAt ? day(inv.lastSentAt) : ""}
    </span>
  );
}

export function PendingInvitations({ siteId }: { siteId: string }) {
  const list = useInvitations(siteId);
  const { resend, revoke } = useInvitationMutations(siteId);
  const [error, setError] = useState<string | null>(null);
  const fail = (e: unknown) => setError(e instanceof ApiError ? e.message : "That did not work.");

  return (
    <section aria-labelledby="pending-title" className="space-y-2">
      <h2 id="pending-title" className="text-lg font-semibold">
        Pending invitations
      </h2>
      {error && (
        <p role="alert" className="text-flare-300">
          {error}
        </p>
      )}
      {list.isPending && <Loading what="Loading invitations" />}
      {(list.isLoadingError || serverRefused(list.error)) && <ErrorPanel error={list.error} />}
      {list.data?.length === 0 && <p className="text-mist">No one is waiting to join.</p>}
      <ul className="divide-y divide-hull-700 rounded-lg bg-hull-850 ring-1 ring-hull-700">
        {list.data?.map((inv) => (
          <li key={inv.id} className="flex flex-wrap items-center gap-3 p-3" data-testid="pending-invitation">
            <span className="min-w-48 flex-1">
              <span className="block break-all font-semibold">{inv.email}</span>
              <span className="block text-sm text-mist">
                {ROLE_LABELS[inv.role]} · invited {day(inv.createdAt)}
                {inv.invitedByName ? ` by ${inv.invitedByName}` : ""}
              </span>
              <span className="mt-1 block">
                <SendState inv={inv} />
              </span>
            </span>
            <span className="flex gap-2">
              <Button
                tone="quiet"
                disabled={resend.isPending}
                onClick={() => {
                  setError(null);
                  resend.mutate(inv.id, { onError: fail });
                }}
              >
                Resend<span className="sr-only"> to {inv.email}</span>
              </Button>
              <Button
                tone="quiet"
                onClick={() =>
                  confirm(`Withdraw the invitation for ${inv.email}? The link stops working.`) &&
                  revoke.mutate(inv.id, { onError: fail })
                }
              >
                Revoke<span className="sr-only"> the invitation for {inv.email}</span>
              </Button>
            </span>
          </li>
        ))}
      </ul>
    </section>
  );
}
