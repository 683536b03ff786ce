import { useState } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { paths } from "../../../config/paths";
import { ApiError } from "../../../lib/api-client";
import { useCreateShareLink, useRevokeShareLink, useShareLinks } from "../api";

/** Links for partner organisations: specifications, quantities and photos only. Curators withdraw them. */
export function ShareLinksPanel({ siteId, canRevoke }: { siteId: string; canRevoke: boolean }) {
  const links = useShareLinks(siteId, true);
  const create = useCreateShareLink(siteId);
  const revoke = useRevokeShareLink(siteId);
  const [label, setLabel] = useState("");
  const [fresh, setFresh] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const fail = (e: unknown) => setError(e instanceof ApiError ? e.message : "That did not work.");

  return (
    <section aria-labelledby="share-title" className="no-print rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="share-title" className="text-lg font-bold">
        Share with partners
      </h2>
      <p className="mt-1 text-sm text-mist">
        A read-only page anyone with the link can open: specifications, quantities and nameplate photos — never prices,
        contacts, notes or names.
      </p>
      <form
        className="mt-3 flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          setError(null);
          create.mutate(
            { label },
            {
              onSuccess: (d) => {
                setFresh(new URL(paths.shareParts.href(d.token), window.location.origin).href);
                setLabel("");
              },
              onError: fail,
            },
          );
        }}
      >
        <TextField
          label="Who is it for"
          value={label}
          onChange={(e) => setLabel(e.target.value)}
          className="min-w-56 flex-1"
        />
        <Button type="submit" disabled={create.isPending}>
          Create share link
        </Button>
      </form>
      {fresh && (
        <div className="mt-3 rounded-md border border-brass-400 p-3" role="status">
          <p className="text-sm">Copy it now; Tideline keeps only a fingerprint of it and cannot show it again.</p>
          <a
            href={fresh}
            data-testid="share-url"
            className="break-all font-mono text-sm"
            target="_blank"
            rel="noreferrer"
          >
            {fresh}
          </a>
        </div>
      )}
      {error && (
        <p role="alert" className="mt-2 text-flare-300">
          {error}
        </p>
      )}
      <ul className="mt-3 divide-y divide-hull-700">
        {links.data?.links.map((l) => (
          <li key={l.id} className="flex flex-wrap items-center gap-3 py-2">
            <span className="flex-1">
              {l.label || "Unlabelled link"}{" "}
              <span className="text-sm text-fog">
                · {new Date(l.createdAt).toLocaleDateString()}
                {l.createdByName ? ` · ${l.createdByName}` : ""}
              </span>
            </span>
            {l.revokedAt ? (
              <span className="text-sm text-mist">Withdrawn</span>
            ) : (
              canRevoke && (
                <Button
                  tone="danger"
                  onClick={() =>
                    confirm("Withdraw this link? Anyone using it will see that it has been withdrawn.") &&
                    revoke.mutate(l.id, { onError: fail })
                  }
                >
                  Withdraw
                </Button>
              )
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}
