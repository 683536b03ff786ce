import { useMemo, useState, type DragEvent } from "react";
import { COMPONENT_KIND_SHORT } from "../../../domain/vocab";
import { usePositionMutations } from "../api";
import type { Section, TileRow } from "../contract";
import { KindGlyph } from "./kind-glyph";

interface Group {
  id: string;
  name: string;
  ids: string[];
}

function groupsOf(sections: Section[], positions: TileRow[]): Group[] {
  const sorted = [...positions].sort(
    (a, b) => a.sortOrder - b.sortOrder || a.gridRow - b.gridRow || a.gridCol - b.gridCol,
  );
  const groups: Group[] = [...sections]
    .sort((a, b) => a.sortOrder - b.sortOrder)
    .map((s) => ({ id: s.id, name: s.name, ids: [] }));
  const loose: Group = { id: "", name: "No section", ids: [] };
  for (const p of sorted) (groups.find((g) => g.id === p.sectionId) ?? loose).ids.push(p.id);
  return loose.ids.length ? [...groups, loose] : groups;
}

const moveItem = (ids: string[], from: number, to: number) => {
  const next = [...ids];
  const [x] = next.splice(from, 1);
  next.splice(to, 0, x);
  return next;
};

/** Positions in their list order per section: drag to reorder, or use the up/down buttons. */
export function PositionOrderList({
  siteId,
  boardId,
  sections,
  positions,
  selectedId,
  onEdit,
}: {
  siteId: string;
  boardId: string;
  sections: Section[];
  positions: TileRow[];
  selectedId: string | null;
  onEdit: (id: string) => void;
}) {
  const m = usePositionMutations(siteId, boardId);
  const initial = useMemo(() => groupsOf(sections, positions), [sections, positions]);
  const [groups, setGroups] = useState(initial);
  const [drag, setDrag] = useState<{ g: number; i: number } | null>(null);
  const [said, setSaid] = useState("");
  // A new order from the server replaces the local one: adjusted while rendering (React's "storing information from previous renders"), not in an effect.
  const [groupsOf_, setGroupsOf] = useState(initial);
  if (groupsOf_ !== initial) {
    setGroupsOf(initial);
    setGroups(initial);
  }
  const byId = useMemo(() => new Map(positions.map((p) => [p.id, p])), [positions]);

  function commit(g: number, from: number, to: number) {
    if (to < 0 || to >= groups[g].ids.length || from === to) return;
    const next = groups.map((x, k) => (k === g ? { ...x, ids: moveItem(x.ids, from, to) } : x));
    setGroups(next);
    setSaid(
      `${byId.get(groups[g].ids[from])?.designation} moved to place ${to + 1} of ${groups[g].ids.length} in ${groups[g].name}.`,
    );
    m.reorder.mutate(next.flatMap((x) => x.ids));
  }
  const onDrop = (g: number, i: number) => (e: DragEvent) => {
    e.preventDefault();
    if (drag && drag.g === g) commit(g, drag.i, i);
    setDrag(null);
  };
  return (
    <section aria-labelledby="order-title" className="min-w-0 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="order-title" className="text-lg font-bold">
        Positions, in list order
      </h2>
      <p className="text-sm text-mist">
        Drag a row by its handle, or use ↑ ↓, to change the order within its section (the order of exports and lists).
      </p>
      <p className="sr-only" aria-live="polite">
        {said}
      </p>
      <p role="status" className="min-h-5 text-sm text-mist">
        {m.reorder.isPending ? "Saving the order…" : m.reorder.isSuccess ? "Order saved." : ""}
      </p>
      {m.reorder.isError && (
        <p role="alert" className="text-sm text-flare-300">
          {m.reorder.error.message}
        </p>
      )}
      {groups.map((grp, g) => (
        <div key={grp.id || "loose"} className="mt-3">
          <h3 className="text-sm font-semibold uppercase tracking-wide text-fog">
            {grp.name} · {grp.ids.length}
          </h3>
          <ol className="mt-1 space-y-1">
            {grp.ids.map((id, i) => {
              const p = byId.get(id);
              if (!p) return null;
              return (
                <li
                  key={id}
                  draggable
                  onDragStart={() => setDrag({ g, i })}
                  onDragOver={(e) => e.preventDefault()}
                  onDrop={onDrop(g, i)}
                  data-testid={`order-${p.designation}`}
                  className={`flex flex-wrap items-center gap-x-2 gap-y-1 rounded-md bg-hull-800 px-2 py-1 ring-1 ${selectedId === id ? "ring-brass-300" : "ring-hull-700"} ${drag?.g === g && drag.i === i ? "opacity-50" : ""}`}
                >
                  <span aria-hidden="true" className="cursor-grab select-none px-1 text-fog">
                    ⠿
                  </span>
                  <span className="w-16 font-mono font-bold">{p.designation}</span>
                  <KindGlyph kind={p.kind} className="h-4 w-4 text-mist" />
                  <span className="w-12 text-xs text-mist">{COMPONENT_KIND_SHORT[p.kind]}</span>
                  <span className="hidden text-xs text-fog sm:inline">
                    row {p.gridRow} · col {p.gridCol}
                    {p.colSpan > 1 || p.rowSpan > 1 ? ` · ${p.colSpan}×${p.rowSpan}` : ""}
                  </span>
                  <span className="min-w-0 flex-1 basis-24 truncate text-xs text-mist">{p.circuit}</span>
                  {/* On a phone the buttons wrap to their own line under the position, never past the edge. */}
                  <span className="ml-auto flex shrink-0 gap-2">
                    <button
                      type="button"
                      className="min-h-11 min-w-11 rounded ring-1 ring-hull-600 disabled:opacity-30"
                      disabled={i === 0}
                      aria-label={`Move ${p.designation} up`}
                      onClick={() => commit(g, i, i - 1)}
                    >
                      ↑
                    </button>
                    <button
                      type="button"
                      className="min-h-11 min-w-11 rounded ring-1 ring-hull-600 disabled:opacity-30"
                      disabled={i === grp.ids.length - 1}
                      aria-label={`Move ${p.designation} down`}
                      onClick={() => commit(g, i, i + 1)}
                    >
                      ↓
                    </button>
                    <button
                      type="button"
                      className="min-h-11 rounded px-3 text-sm text-brass-300 ring-1 ring-hull-600"
                      onClick={() => onEdit(id)}
                      aria-label={`Edit ${p.designation}`}
                    >
                      Edit
                    </button>
                  </span>
                </li>
              );
            })}
          </ol>
        </div>
      ))}
    </section>
  );
}
