import { useCallback, useMemo, useState } from "react";
import { Link, useSearchParams } from "react-router";
import type { RowSelectionState } from "@tanstack/react-table";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useMediaQuery } from "../../../lib/use-media-query";
import { csvHref, useDefectList, useDefectOptions } from "../api";
import { apiQuery, localToday, PAGE_SIZES, readState, writeState, type RegisterState } from "../url-state";
import { BulkBar } from "./bulk-bar";
import { ColumnMenu } from "./column-menu";
import { RegisterFilters } from "./register-filters";
import { RegisterCards, RegisterTable } from "./register-table";
import { SavedViews } from "./saved-views";

/** From Tailwind's `md` (48rem) up the register is a table; below it, on a phone, cards (register-table.tsx). */
const WIDE = "(min-width: 48rem)";

export function Register({ siteId, canManage, canRaise }: { siteId: string; canManage: boolean; canRaise: boolean }) {
  const [params, setParams] = useSearchParams();
  const state = useMemo(() => readState(params), [params]);
  const [today] = useState(localToday);
  const query = apiQuery(state, today);
  const list = useDefectList(siteId, query);
  const options = useDefectOptions(siteId);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const wide = useMediaQuery(WIDE);
  const Rows = wide ? RegisterTable : RegisterCards;
  const onState = useCallback(
    (patch: Partial<RegisterState>) =>
      setParams((old) => new URLSearchParams(writeState({ ...readState(old), ...patch })), { replace: false }),
    [setParams],
  );
  const ids = Object.keys(selection).filter((k) => selection[k]);
  const viewQuery = writeState(state);
  const total = list.data?.total ?? 0;
  const from = total ? state.page * state.size + 1 : 0;
  const to = Math.min(total, (state.page + 1) * state.size);
  const pages = Math.max(1, Math.ceil(total / state.size));
  const filtered = viewQuery.replace(/(^|&)(sort|dir|page|size|hide|cols)=[^&]*/g, "") !== "";

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-2">
        <SavedViews siteId={siteId} query={viewQuery} />
        <div className="flex flex-wrap gap-2">
          {wide && <ColumnMenu state={state} onState={onState} />}
          <a
            href={csvHref(siteId, query)}
            className="inline-flex min-h-11 items-center rounded-md bg-hull-800 px-3 text-sm font-semibold text-chalk no-underline ring-1 ring-hull-600"
            download
          >
            Export CSV
          </a>
        </div>
      </div>
      <RegisterFilters state={state} onState={onState} options={options.data} />
      {canManage && ids.length > 0 && (
        <BulkBar siteId={siteId} ids={ids} options={options.data} onDone={() => setSelection({})} />
      )}
      {wide && (
        <p id="register-keys" className="text-xs text-fog">
          Keys: ↑ ↓ move between defects, Enter opens one{canManage ? ", x selects it" : ""}. Click a column heading to
          sort by it.
        </p>
      )}
      {list.isPending && <Loading what="Loading the register" />}
      {(list.isLoadingError || serverRefused(list.error)) && <ErrorPanel error={list.error} />}
      {list.data && total === 0 && (
        <EmptyState title={filtered ? "No defect matches these filters" : "No defects raised yet"}>
          {filtered ? (
            <button
              type="button"
              className="underline"
              onClick={() =>
                onState({ q: "", board: [], category: [], severity: [], status: [], assignee: [], flag: [], page: 0 })
              }
            >
              Clear the filters to see every defect.
            </button>
          ) : canRaise ? (
            <>
              Raise one from a survey finding, or{" "}
              <Link className="underline" to={paths.defectNew.href(siteId)}>
                raise a defect
              </Link>{" "}
              here.
            </>
          ) : (
            <>Defects appear here once the crew raises them from the survey.</>
          )}
        </EmptyState>
      )}
      {list.data && total > 0 && (
        <>
          <Rows
            siteId={siteId}
            rows={list.data.rows}
            total={total}
            state={state}
            onState={onState}
            selection={selection}
            onSelection={setSelection}
            canSelect={canManage}
            busy={list.isFetching}
          />
          <nav aria-label="Pages of the register" className="flex flex-wrap items-center gap-3 text-sm">
            <p role="status">
              Showing {from}–{to} of {total}
            </p>
            <button
              type="button"
              className="min-h-11 rounded-md bg-hull-800 px-3 ring-1 ring-hull-600 disabled:opacity-40"
              disabled={state.page === 0}
              onClick={() => onState({ page: state.page - 1 })}
            >
              ← Previous
            </button>
            <span>
              Page {state.page + 1} of {pages}
            </span>
            <button
              type="button"
              className="min-h-11 rounded-md bg-hull-800 px-3 ring-1 ring-hull-600 disabled:opacity-40"
              disabled={state.page + 1 >= pages}
              onClick={() => onState({ page: state.page + 1 })}
            >
              Next →
            </button>
            <label className="flex items-center gap-2">
              Rows per page
              <select
                className="min-h-11 rounded-md border border-hull-500 bg-hull-900 px-2"
                value={state.size}
                onChange={(e) => onState({ size: Number(e.target.value), page: 0 })}
              >
                {PAGE_SIZES.map((n) => (
                  <option key={n} value={n}>
                    {n}
                  </option>
                ))}
              </select>
            </label>
          </nav>
        </>
      )}
    </div>
  );
}
