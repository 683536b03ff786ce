import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { WithMessage } from "../../../components/field";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { PHOTO_KINDS, PHOTO_KIND_LABELS } from "../../../domain/vocab";
import { photoPatch, type Photo, type PhotoTargetBoard } from "../../../schemas/photos";
import { usePhotoMutations } from "../api";
import { PositionPicker, type UseSiteSearch } from "./position-picker";

const control = "mt-1 block min-h-11 w-full rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk";
const STALE = "Someone changed this photo meanwhile; the form now shows their version. Edit again if needed.";

/**
 * The form's text → the PATCH body; photoPatch (the server's own schema) validates it. The place goes only
 * when it changed: no position means the photo is filed to the chosen board itself.
 */
const tagForm = (base: Photo) =>
  z
    .object({ kind: z.string(), caption: z.string(), boardId: z.string(), positionId: z.string() })
    .transform(({ positionId, boardId, ...v }) => {
      const moved = positionId
        ? positionId !== (base.positionId ?? "")
        : !!base.positionId || (!!boardId && boardId !== (base.boardId ?? ""));
      return {
        ...v,
        version: base.version,
        ...(moved ? { positionId: positionId || null, boardId: positionId ? undefined : boardId || base.boardId } : {}),
      } as z.input<typeof photoPatch>;
    })
    .pipe(photoPatch);

/** Kind, caption and position of one photo; a stale edit shows the photo as it is now (409). */
export function PhotoTagForm({
  siteId,
  photo,
  boards,
  useSiteSearch,
  onSaved,
}: {
  siteId: string;
  photo: Photo;
  boards: PhotoTargetBoard[];
  useSiteSearch?: UseSiteSearch;
  onSaved?: (p: Photo) => void;
}) {
  // The photo as last stored: after a save, or as someone else left it (409).
  const [base, setBase] = useState(photo);
  const [note, setNote] = useState<string | null>(null);
  // Another photo opened in the same form starts from that photo: adjusted while rendering (React's "storing information from previous renders"), not in an effect.
  if (base.id !== photo.id) {
    setBase(photo);
    setNote(null);
  }
  return (
    <TagFields
      key={`${base.id}:${base.version}`}
      siteId={siteId}
      base={base}
      boards={boards}
      useSiteSearch={useSiteSearch}
      note={note}
      onStored={(p, text) => {
        setBase(p);
        setNote(text);
        if (text !== STALE) onSaved?.(p);
      }}
      clearNote={() => setNote(null)}
    />
  );
}

function TagFields({
  siteId,
  base,
  boards,
  useSiteSearch,
  note,
  onStored,
  clearNote,
}: {
  siteId: string;
  base: Photo;
  boards: PhotoTargetBoard[];
  useSiteSearch?: UseSiteSearch;
  note: string | null;
  onStored: (p: Photo, note: string) => void;
  clearNote: () => void;
}) {
  const { patch } = usePhotoMutations(siteId);
  const schema = useMemo(() => tagForm(base), [base]);
  const form = useSchemaForm(schema, {
    kind: base.kind,
    caption: base.caption,
    boardId: base.boardId ?? "",
    positionId: base.positionId ?? "",
  });
  const { register, formState } = form;
  const place = { boardId: form.watch("boardId"), positionId: form.watch("positionId") };
  const e = (name: "kind" | "caption" | "positionId") => fieldError(formState.errors, name);
  const submit = form.handleSubmit((body) =>
    patch.mutateAsync({ id: base.id, ...body }).then(
      (p) => onStored(p, "✓ Saved."),
      (err: unknown) => {
        if (err instanceof ApiError && err.status === 409 && err.current) onStored(err.current as Photo, STALE);
        else showSaveError(form, err);
      },
    ),
  );
  const message = formMessage(formState.errors) ?? note;
  return (
    <form
      onSubmit={(ev) => {
        clearNote();
        void submit(ev);
      }}
      noValidate
      className="grid gap-2 p-3 sm:grid-cols-[10rem_minmax(0,1fr)] sm:items-end"
      aria-label="Tag this photo"
    >
      <WithMessage error={e("kind")}>
        {(describedBy) => (
          <label className="text-sm font-semibold text-mist">
            Kind
            <select className={control} {...register("kind")} aria-describedby={describedBy}>
              {PHOTO_KINDS.map((k) => (
                <option key={k} value={k}>
                  {PHOTO_KIND_LABELS[k]}
                </option>
              ))}
            </select>
          </label>
        )}
      </WithMessage>
      <WithMessage error={e("caption")}>
        {(describedBy) => (
          <label className="text-sm font-semibold text-mist">
            Caption
            <input
              className={control}
              {...register("caption")}
              maxLength={500}
              aria-invalid={!!e("caption")}
              aria-describedby={describedBy}
            />
          </label>
        )}
      </WithMessage>
      <WithMessage error={e("positionId")} className="sm:col-span-2">
        {(describedBy) => (
          <fieldset>
            <legend className="text-sm font-semibold text-mist">Filed to</legend>
            <PositionPicker
              siteId={siteId}
              boards={boards}
              value={place}
              onChange={(p) => {
                form.setValue("boardId", p.boardId, { shouldDirty: true });
                form.setValue("positionId", p.positionId, { shouldDirty: true });
              }}
              useSiteSearch={useSiteSearch}
              noPosition="Not filed to a position"
              describedBy={describedBy}
            />
          </fieldset>
        )}
      </WithMessage>
      <Button type="submit" disabled={patch.isPending} className="sm:col-span-2 sm:justify-self-start">
        Save tags
      </Button>
      {message && (
        <p role="status" className="text-sm text-mist sm:col-span-2">
          {message}
        </p>
      )}
    </form>
  );
}
