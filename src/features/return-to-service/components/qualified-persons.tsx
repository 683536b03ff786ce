import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { blankAsNull, fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { qualifiedBody, type QualifiedPerson } from "../../../schemas/return-to-service";
import { useQualifiedPersons, useRtsAction } from "../api";

/** The form's text → the request body; qualifiedBody (the server's own schema) validates it. */
const qualificationForm = (version: number) =>
  z
    .object({ qualification: z.string(), expiresOn: blankAsNull })
    .transform((v) => ({ ...v, version }) as z.input<typeof qualifiedBody>)
    .pipe(qualifiedBody);

function QualificationForm({ siteId, p, onDone }: { siteId: string; p: QualifiedPerson; onDone: () => void }) {
  const act = useRtsAction(siteId);
  const remove = useRtsAction(siteId);
  const schema = useMemo(() => qualificationForm(p.version), [p.version]);
  const form = useSchemaForm(schema, { qualification: p.qualification ?? "", expiresOn: p.expiresOn ?? "" });
  const { register, formState } = form;
  const e = (name: Parameters<typeof register>[0]) => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    act
      .mutateAsync({ method: "PUT", path: `/return-to-service/qualified-persons/${p.userId}`, body })
      .then(onDone, (err: unknown) => showSaveError(form, err)),
  );
  const message = serverMessage(formState.errors);
  return (
    <>
      <form
        className="mt-2 flex flex-wrap items-start gap-2"
        aria-label={`Qualification of ${p.name}`}
        onSubmit={(ev) => void submit(ev)}
        noValidate
      >
        <TextField
          className="flex-1"
          label="Qualification"
          {...register("qualification")}
          required
          error={e("qualification")}
        />
        <TextField label="Expires on" type="date" {...register("expiresOn")} error={e("expiresOn")} />
        <div className="flex gap-2 self-end">
          <Button type="submit" disabled={formState.isSubmitting}>
            Save
          </Button>
          {p.qualification && (
            <Button
              tone="danger"
              disabled={remove.isPending}
              onClick={() =>
                remove.mutate(
                  { method: "DELETE", path: `/return-to-service/qualified-persons/${p.userId}` },
                  { onSuccess: onDone },
                )
              }
            >
              Remove
            </Button>
          )}
        </div>
      </form>
      {(message ?? remove.error) && (
        <p role="alert" className="text-sm text-rust-300">
          {message ?? (remove.error instanceof ApiError ? remove.error.message : String(remove.error))}
        </p>
      )}
    </>
  );
}

function Row({ siteId, p, canManage }: { siteId: string; p: QualifiedPerson; canManage: boolean }) {
  const [editing, setEditing] = useState(false);
  return (
    <li className="p-3" data-testid={`qp-${p.userId}`}>
      <p>
        <strong>{p.name}</strong>{" "}
        {p.qualification ? (
          <span className={p.current ? "text-kelp-300" : "text-rust-300"}>
            {p.current ? "✔ qualified person" : "✖ qualification expired"}: {p.qualification}
            {p.expiresOn ? ` (until ${p.expiresOn})` : " (no expiry)"}
          </span>
        ) : (
          <span className="text-mist">not a qualified person for energisation</span>
        )}
        {p.suspended && (
          <span className="block text-sm text-flare-300">
            Account suspended by the instance&apos;s admin: cannot sign a hold point.
          </span>
        )}
      </p>
      {canManage &&
        (!editing ? (
          <Button tone="quiet" onClick={() => setEditing(true)}>
            {p.qualification ? "Edit qualification" : "Mark as qualified person"}
          </Button>
        ) : (
          <QualificationForm siteId={siteId} p={p} onDone={() => setEditing(false)} />
        ))}
    </li>
  );
}

/**
 * The crew page's list of qualified persons for energisation (only they sign energise and release); the curator
 * records and edits them (`canManage`), every other member reads who they are (a gate blocker links here).
 */
export function QualifiedPersons({ siteId, canManage }: { siteId: string; canManage: boolean }) {
  const q = useQualifiedPersons(siteId);
  return (
    <section aria-labelledby="qp-title" className="space-y-2">
      <h2 id="qp-title" className="text-xl font-bold">
        Qualified persons for energisation
      </h2>
      <p className="text-sm text-mist">
        Only a qualified person with a current qualification signs the energise and release hold points. Recording it
        here does not make anyone qualified: the qualification itself comes from training and local rules (NFPA 70E).
      </p>
      <ul className="divide-y divide-hull-700 rounded-lg ring-1 ring-hull-700">
        {q.data?.map((p) => (
          <Row key={p.userId} siteId={siteId} p={p} canManage={canManage} />
        ))}
      </ul>
    </section>
  );
}
