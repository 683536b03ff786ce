import { useMemo } from "react";
import { useNavigate } from "react-router";
import { z } from "zod";
import { WithMessage } from "../../../components/field";
import { paths } from "../../../config/paths";
import { fieldError, serverMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { viewBody } from "../../../schemas/defects";
import { useDeleteView, useSaveView, useSavedViews } from "../api";

/** The person's own named register views: each is the register's URL query. */
export function SavedViews({ siteId, query }: { siteId: string; query: string }) {
  const views = useSavedViews(siteId);
  const save = useSaveView(siteId);
  const del = useDeleteView(siteId);
  const navigate = useNavigate();
  const current = views.data?.find((v) => v.query === query);
  // The name typed → the view's body with the register's query; viewBody (the server's own schema) checks it.
  const schema = useMemo(
    () =>
      z
        .object({ name: z.string() })
        .transform((v) => ({ ...v, query }) as z.input<typeof viewBody>)
        .pipe(viewBody),
    [query],
  );
  const form = useSchemaForm(schema, { name: "" });
  const errors = form.formState.errors;
  const submit = form.handleSubmit((body) =>
    save.mutateAsync(body).then(
      () => form.reset(),
      (err: unknown) => showSaveError(form, err, { fallback: "Not saved." }),
    ),
  );
  const error = serverMessage(errors);
  return (
    <div className="flex flex-wrap items-end gap-2">
      <label className="text-sm font-semibold text-mist">
        My views
        <select
          className="mt-1 block min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
          value={current?.id ?? ""}
          onChange={(e) => {
            const v = views.data?.find((x) => x.id === e.target.value);
            navigate(paths.defects.href(siteId, v?.query ?? ""));
          }}
        >
          <option value="">{current ? "—" : "Choose a saved view"}</option>
          {views.data?.map((v) => (
            <option key={v.id} value={v.id}>
              {v.name}
            </option>
          ))}
        </select>
      </label>
      {current && (
        <button type="button" className="min-h-11 px-2 text-sm underline" onClick={() => del.mutate(current.id)}>
          Delete “{current.name}”
        </button>
      )}
      <form onSubmit={(ev) => void submit(ev)} noValidate className="flex items-end gap-2">
        <WithMessage error={fieldError(errors, "name")}>
          {(describedBy) => (
            <label className="text-sm font-semibold text-mist">
              Save this view as
              <input
                {...form.register("name")}
                required
                maxLength={80}
                aria-invalid={!!fieldError(errors, "name")}
                aria-describedby={describedBy}
                className="mt-1 block min-h-11 w-44 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
              />
            </label>
          )}
        </WithMessage>
        <button
          type="submit"
          className="min-h-11 rounded-md bg-hull-800 px-3 font-semibold ring-1 ring-hull-600"
          disabled={save.isPending}
        >
          Save view
        </button>
      </form>
      {error && (
        <p role="alert" className="text-sm text-flare-300">
          {error}
        </p>
      )}
    </div>
  );
}
