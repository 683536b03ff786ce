import { useState } from "react";
import { Button } from "../../../components/button";
import { DEFAULT_TEMPLATE, STEP_KINDS, STEP_KIND_LABELS, type StepKind } from "../../../domain/return-to-service";
import { ApiError } from "../../../lib/api-client";
import type { RtsSettings } from "../../../schemas/return-to-service";
import { useRtsAction } from "../api";

const box = "mt-1 w-full min-h-11 rounded-md bg-hull-900 px-2 ring-1 ring-hull-600";
type Row = { key: number; kind: StepKind; title: string; detail: string };
let nextKey = 1;
const rowsOf = (t: RtsSettings["template"]): Row[] => t.map((x) => ({ ...x, key: nextKey++ }));

/**
 * The site's hold-point template, edited by the curator: new stages copy it; stages already
 * planned keep their own hold points. A stale save gets 409 and the template as it is now.
 */
export function TemplateEditor({
  siteId,
  settings,
  canEdit,
}: {
  siteId: string;
  settings: RtsSettings;
  canEdit: boolean;
}) {
  const act = useRtsAction(siteId);
  const [rows, setRows] = useState<Row[]>(() => rowsOf(settings.template));
  const [days, setDays] = useState(String(settings.insulationMaxAgeDays));
  const [version, setVersion] = useState(settings.version);
  const [saved, setSaved] = useState(false);
  const change = (key: number, patch: Partial<Row>) => {
    setSaved(false);
    setRows((rs) => rs.map((r) => (r.key === key ? { ...r, ...patch } : r)));
  };
  const move = (i: number, to: number) => {
    setSaved(false);
    setRows((rs) => {
      const out = [...rs];
      const [r] = out.splice(i, 1);
      out.splice(to, 0, r);
      return out;
    });
  };
  const err = act.error instanceof ApiError ? act.error : null;
  const save = () =>
    act.mutate(
      {
        method: "PUT",
        path: "/return-to-service/settings",
        body: {
          insulationMaxAgeDays: Number(days),
          template: rows.map(({ kind, title, detail }) => ({ kind, title, detail })),
          version,
        },
      },
      {
        onSuccess: (r) => {
          const s = (r as { settings: RtsSettings }).settings;
          setVersion(s.version);
          setSaved(true);
        },
        onError: (e) => {
          // Someone saved first: show theirs, so nothing is overwritten unseen.
          const cur = e instanceof ApiError && e.status === 409 ? (e.current as RtsSettings | undefined) : undefined;
          if (cur) {
            setRows(rowsOf(cur.template));
            setDays(String(cur.insulationMaxAgeDays));
            setVersion(cur.version);
          }
        },
      },
    );
  return (
    <form
      aria-label="Hold-point template"
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        save();
      }}
    >
      <fieldset disabled={!canEdit} className="space-y-4">
        <label className="block max-w-xs">
          An insulation reading counts for (days)
          <input className={box} inputMode="numeric" value={days} onChange={(e) => setDays(e.target.value)} required />
        </label>
        <ol className="space-y-3" aria-label="Hold points of a new stage">
          {rows.map((r, i) => (
            <li key={r.key} className="space-y-2 rounded-md bg-hull-800 p-3 ring-1 ring-hull-600">
              <div className="grid gap-2 sm:grid-cols-[14rem_1fr]">
                <label className="block text-sm">
                  Kind ({i + 1})
                  <select
                    className={box}
                    value={r.kind}
                    onChange={(e) => change(r.key, { kind: e.target.value as StepKind })}
                  >
                    {STEP_KINDS.map((k) => (
                      <option key={k} value={k}>
                        {STEP_KIND_LABELS[k]}
                      </option>
                    ))}
                  </select>
                </label>
                <label className="block text-sm">
                  Hold point ({i + 1})
                  <input
                    className={box}
                    value={r.title}
                    onChange={(e) => change(r.key, { title: e.target.value })}
                    required
                    minLength={2}
                  />
                </label>
              </div>
              <label className="block text-sm">
                What it asks for ({i + 1})
                <textarea
                  className="mt-1 w-full rounded-md bg-hull-900 p-2 ring-1 ring-hull-600"
                  value={r.detail}
                  onChange={(e) => change(r.key, { detail: e.target.value })}
                />
              </label>
              {canEdit && (
                <div className="flex flex-wrap gap-2 text-sm">
                  <Button tone="quiet" disabled={i === 0} onClick={() => move(i, i - 1)}>
                    <span aria-hidden>↑</span> Move up
                  </Button>
                  <Button tone="quiet" disabled={i === rows.length - 1} onClick={() => move(i, i + 1)}>
                    <span aria-hidden>↓</span> Move down
                  </Button>
                  <Button
                    tone="quiet"
                    disabled={rows.length === 1}
                    onClick={() => {
                      setSaved(false);
                      setRows((rs) => rs.filter((x) => x.key !== r.key));
                    }}
                  >
                    Remove
                  </Button>
                </div>
              )}
            </li>
          ))}
        </ol>
      </fieldset>
      {err && (
        <p role="alert" className="text-sm text-rust-300">
          {err.message}
        </p>
      )}
      {saved && (
        <p role="status" className="text-sm">
          Saved. New stages take these hold points; stages already planned keep theirs.
        </p>
      )}
      {canEdit && (
        <div className="flex flex-wrap gap-2">
          <Button
            tone="quiet"
            onClick={() => {
              setSaved(false);
              setRows((rs) => [...rs, { key: nextKey++, kind: "custom", title: "", detail: "" }]);
            }}
          >
            Add a hold point
          </Button>
          <Button
            tone="quiet"
            onClick={() => {
              setSaved(false);
              setRows(rowsOf(DEFAULT_TEMPLATE));
            }}
          >
            Start again from Tideline's default
          </Button>
          <Button type="submit" disabled={act.isPending}>
            Save the template
          </Button>
        </div>
      )}
    </form>
  );
}
