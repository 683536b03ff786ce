import { z } from "zod";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { createSectionBody, patchSectionBody } from "../../../schemas/inventory";
import { useSectionMutations } from "../api";
import type { Section } from "../contract";

/** A rename's text → the PATCH body (without the version: the record's, added on sending); the server's schema validates it. */
const renameForm = z
  .object({ name: z.string() })
  .transform((v): Omit<z.input<typeof patchSectionBody>, "version"> => v)
  .pipe(patchSectionBody.omit({ version: true }));
/** A new section's name → the POST body; createSectionBody (the server's own schema) validates it. */
const addForm = z.object({ name: z.string() }).pipe(createSectionBody);

function SectionRow({ s, siteId, boardId }: { s: Section; siteId: string; boardId: string }) {
  const m = useSectionMutations(siteId, boardId);
  // The row is keyed by the section's version, so a saved rename starts it again from the stored name.
  const form = useSchemaForm(renameForm, { name: s.name });
  const errors = form.formState.errors;
  const name = form.watch("name");
  const err = m.update.error ?? m.remove.error;
  const stale = err instanceof ApiError && err.status === 409 ? (err.current as Section | undefined) : undefined;
  // A stale version shows as the notice below; a refused delete as its own message.
  const message = stale
    ? null
    : (formMessage(errors, "above") ?? (m.remove.error instanceof Error ? m.remove.error.message : null));
  const rename = (version: number) =>
    form.handleSubmit((body) =>
      m.update.mutateAsync({ id: s.id, ...body, version }).catch((e: unknown) => {
        if (!(e instanceof ApiError && e.status === 409)) showSaveError(form, e);
      }),
    )();
  return (
    <li>
      <form
        onSubmit={(ev) => {
          ev.preventDefault();
          void rename(s.version);
        }}
        noValidate
        aria-label={`Section “${s.name}”`}
        className="flex flex-wrap items-end gap-2 py-2"
      >
        <TextField
          className="min-w-40 flex-1"
          label={`Name of section “${s.name}”`}
          {...form.register("name")}
          error={fieldError(errors, "name")}
        />
        <Button type="submit" tone="quiet" disabled={name === s.name || m.update.isPending}>
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
                form.reset({ name: stale.name });
                m.update.reset();
                m.remove.reset();
              }}
            >
              Use theirs
            </button>
            {" · "}
            <button type="button" className="underline" onClick={() => void rename(stale.version)}>
              Apply mine again
            </button>
          </p>
        )}
        {message && (
          <p role="alert" className="basis-full text-sm text-flare-300">
            {message}
          </p>
        )}
      </form>
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
  const form = useSchemaForm(addForm, { name: "" });
  const errors = form.formState.errors;
  const name = form.watch("name");
  const add = form.handleSubmit((body) =>
    m.create.mutateAsync(body).then(
      () => form.reset({ name: "" }),
      (e: unknown) => showSaveError(form, e),
    ),
  );
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
      <form
        onSubmit={(ev) => void add(ev)}
        noValidate
        className="mt-2 flex flex-wrap items-end gap-2"
        aria-label="Add a section"
      >
        <TextField
          className="min-w-40 flex-1"
          label="New section"
          placeholder="e.g. Section 3 — lighting"
          {...form.register("name")}
          error={fieldError(errors, "name") ?? serverMessage(errors) ?? undefined}
        />
        <Button type="submit" disabled={!name.trim() || m.create.isPending}>
          Add section
        </Button>
      </form>
    </section>
  );
}
