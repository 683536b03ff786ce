import { useState } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { paths } from "../../../config/paths";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { shareLinkBody } from "../../../schemas/parts";
import { useCreateShareLink, useRevokeShareLink, useShareLinks } from "../api";
import { dateOf } from "../../../lib/clock";

/** Links for partner organisations: specifications, quantities and photos only. Curators withdraw them. */
export function ShareLinksPanel({ siteId, canRevoke }: { siteId: string; canRevoke: boolean }) {
  const links = useShareLinks(siteId, true);
  const create = useCreateShareLink(siteId);
  const revoke = useRevokeShareLink(siteId);
  const form = useSchemaForm(shareLinkBody, { label: "" });
  const errors = form.formState.errors;
  // The link just made: shown once, since only its fingerprint is kept.
  const [fresh, setFresh] = useState<string | null>(null);
  const submit = form.handleSubmit((body) =>
    create.mutateAsync(body).then(
      (d) => {
        setFresh(new URL(paths.shareParts.href(d.token), window.location.origin).href);
        form.reset();
      },
      (err: unknown) => showSaveError(form, err, { fallback: "That did not work." }),
    ),
  );
  // Withdrawing is a button, not a form: its refusal is the mutation's own error.
  const withdrawError =
    revoke.error && (revoke.error instanceof ApiError ? revoke.error.message : "That did not work.");
  const error = formMessage(errors) ?? withdrawError;

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
        noValidate
        onSubmit={(ev) => {
          revoke.reset();
          void submit(ev);
        }}
      >
        <TextField
          label="Who is it for"
          {...form.register("label")}
          error={fieldError(errors, "label")}
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
                · {dateOf(l.createdAt)}
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
                    (form.clearErrors(), revoke.mutate(l.id))
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
