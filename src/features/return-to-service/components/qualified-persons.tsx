import { useState } from "react";
import { Button } from "../../../components/button";
import { ApiError } from "../../../lib/api-client";
import type { QualifiedPerson } from "../../../schemas/return-to-service";
import { useQualifiedPersons, useRtsAction } from "../api";

function Row({ siteId, p }: { siteId: string; p: QualifiedPerson }) {
  const act = useRtsAction(siteId);
  const [editing, setEditing] = useState(false);
  const [qualification, setQ] = useState(p.qualification ?? "");
  const [expiresOn, setE] = useState(p.expiresOn ?? "");
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
      </p>
      {!editing ? (
        <Button tone="quiet" onClick={() => setEditing(true)}>
          {p.qualification ? "Edit qualification" : "Mark as qualified person"}
        </Button>
      ) : (
        <form
          className="mt-2 flex flex-wrap items-end gap-2"
          aria-label={`Qualification of ${p.name}`}
          onSubmit={(e) => {
            e.preventDefault();
            act.mutate(
              {
                method: "PUT",
                path: `/return-to-service/qualified-persons/${p.userId}`,
                body: { qualification, expiresOn: expiresOn || null, version: p.version },
              },
              { onSuccess: () => setEditing(false) },
            );
          }}
        >
          <label className="block flex-1">
            Qualification
            <input
              className="mt-1 min-h-11 w-full rounded-md bg-hull-900 px-2"
              value={qualification}
              onChange={(e) => setQ(e.target.value)}
              required
              minLength={2}
            />
          </label>
          <label className="block">
            Expires on
            <input
              type="date"
              className="mt-1 min-h-11 rounded-md bg-hull-900 px-2"
              value={expiresOn}
              onChange={(e) => setE(e.target.value)}
            />
          </label>
          <Button type="submit" disabled={act.isPending}>
            Save
          </Button>
          {p.qualification && (
            <Button
              tone="danger"
              onClick={() =>
                act.mutate(
                  { method: "DELETE", path: `/return-to-service/qualified-persons/${p.userId}` },
                  { onSuccess: () => setEditing(false) },
                )
              }
            >
              Remove
            </Button>
          )}
        </form>
      )}
      {act.error && (
        <p role="alert" className="text-sm text-rust-300">
          {act.error instanceof ApiError ? act.error.message : String(act.error)}
        </p>
      )}
    </li>
  );
}

/** The crew page's list of qualified persons for energisation (only they sign energise and release). */
export function QualifiedPersons({ siteId }: { siteId: string }) {
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
          <Row key={p.userId} siteId={siteId} p={p} />
        ))}
      </ul>
    </section>
  );
}
