import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { useSectionMutations } from "../api";
import type { Section } from "../contract";

function SectionRow({ s, siteId, boardId }: { s: Section; siteId: string; boardId: string }) {
  const m = useSectionMutations(siteId, boardId);
  const [name, setName] = useState(s.name);
  const err = m.update.error ?? m.remove.error;
  const stale = err instanceof ApiError && err.status === 409 ? (err.current as Section | undefined) : undefined;
  return (
    <li className="flex flex-wrap items-end gap-2 py-2">
      <TextField
        className="min-w-40 flex-1"
        label={`Name of section “${s.name}”`}
        value={name}
        onChange={(e) => setName(e.target.value)}
      />
      <Button
        tone="quiet"
        disabled={name === s.name || m.update.isPending}
        onClick={() => m.update.mutate({ id: s.id, name, version: s.version })}
      >
        Rename
      </Button>
      <Button
        tone="quiet"
        onClick={() =>
          confirm(`Delete section “${s.name}”? Its positions stay on the board, without a section.`) &&
          m.remove.mutate({ id: s.id, version: s.version })
        }
      >
        Delete
      </Button>
      {stale && (
        <p role="alert" className="basis-full text-sm text-brass-300">
          Someone renamed it to “{stale.name}” meanwhile.{" "}
          <button
            type="button"
            className="underline"
            onClick={() => {
              setName(stale.name);
              m.update.reset();
              m.remove.reset();
            }}
          >
            Use theirs
          </button>
          {" · "}
          <button
            type="button"
            className="underline"
            onClick={() => m.update.mutate({ id: s.id, name, version: stale.version })}
          >
            Apply mine again
          </button>
        </p>
      )}
      {err && !stale && (
        <p role="alert" className="basis-full text-sm text-flare-300">
          {err.message}
        </p>
      )}
    </li>
  );
}

/** The board's panels: add, rename, delete. */
export function SectionsEditor({
  siteId,
  boardId,
  sections,
}: {
  siteId: string;
  boardId: string;
  sections: Section[];
}) {
  const m = useSectionMutations(siteId, boardId);
  const [name, setName] = useState("");
  const add = (e: FormEvent) => {
    e.preventDefault();
    m.create.mutate({ name }, { onSuccess: () => setName("") });
  };
  return (
    <section aria-labelledby="sections-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="sections-title" className="text-lg font-bold">
        Sections
      </h2>
      <ul className="divide-y divide-hull-700">
        {sections.map((s) => (
          <SectionRow key={`${s.id}-${s.version}`} s={s} siteId={siteId} boardId={boardId} />
        ))}
      </ul>
      <form onSubmit={add} className="mt-2 flex flex-wrap items-end gap-2" aria-label="Add a section">
        <TextField
          className="min-w-40 flex-1"
          label="New section"
          placeholder="e.g. Section 3 — lighting"
          value={name}
          onChange={(e) => setName(e.target.value)}
          error={
            m.create.error instanceof ApiError ? (m.create.error.fields.name ?? m.create.error.message) : undefined
          }
        />
        <Button type="submit" disabled={!name.trim() || m.create.isPending}>
          Add section
        </Button>
      </form>
    </section>
  );
}
