import { useState, type FormEvent } from "react";
import { useNavigate } from "react-router";
import { paths } from "../../../config/paths";
import { ApiError } from "../../../lib/api-client";
import { useDeleteView, useSaveView, useSavedViews } from "../api";

/** The person's own named register views: each is the register's URL query. */
export function SavedViews({ siteId, query }: { siteId: string; query: string }) {
  const views = useSavedViews(siteId);
  const save = useSaveView(siteId);
  const del = useDeleteView(siteId);
  const navigate = useNavigate();
  const [name, setName] = useState("");
  const [error, setError] = useState<string | null>(null);
  const current = views.data?.find((v) => v.query === query);

  function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    save.mutate(
      { name, query },
      {
        onSuccess: () => setName(""),
        onError: (err) => setError(err instanceof ApiError ? err.message : "Not saved."),
      },
    );
  }
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
      <form onSubmit={submit} className="flex items-end gap-2">
        <label className="text-sm font-semibold text-mist">
          Save this view as
          <input
            value={name}
            onChange={(e) => setName(e.target.value)}
            required
            maxLength={80}
            className="mt-1 block min-h-11 w-44 rounded-md border border-hull-500 bg-hull-900 px-2 text-chalk"
          />
        </label>
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
