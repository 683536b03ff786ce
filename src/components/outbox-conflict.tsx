import { useState } from "react";
import { discard, resend, type OutboxItem } from "../lib/outbox";
import { fieldLabel, valueWords } from "../schemas/field-labels";

type Primitive = string | number | boolean | null;
/** The plain fields of a body or record (lists and nested objects are not compared here). */
export const primitives = (o: unknown): Record<string, Primitive> =>
  Object.fromEntries(
    Object.entries((o && typeof o === "object" ? o : {}) as Record<string, unknown>).filter(
      ([, v]) => v === null || ["string", "number", "boolean"].includes(typeof v),
    ),
  ) as Record<string, Primitive>;
/** A value as the person's form said it: the enum's words (valueWords), yes/no, "(empty)". */
const shown = (kind: string, key: string, v: Primitive | undefined) =>
  v === undefined
    ? "—"
    : v === null || v === ""
      ? "(empty)"
      : typeof v === "boolean"
        ? v
          ? "yes"
          : "no"
        : typeof v === "string"
          ? valueWords(kind, key, v)
          : String(v);

const NOT_COMPARED = ["id", "siteId", "positionId", "createdAt", "updatedAt", "version"];

/**
 * A conflict: what this phone sent beside what the server has now, field by field; the person
 * chooses. For an edit of an existing record (a PATCH) each field is chosen on its own — a field left
 * at the server's value is not sent, so it stays as the other person left it — and the choice goes
 * with the version now current (and the same Idempotency-Key). Nothing is sent or dropped unasked.
 */
export function Conflict({ item }: { item: OutboxItem }) {
  const mine = primitives(item.body);
  const theirsRaw = primitives(item.error?.current);
  const compareAs = item.edit?.compareAs ?? {};
  const theirOf = (k: string) => theirsRaw[compareAs[k] ?? k];
  const keys = item.edit
    ? Object.keys(mine).filter((k) => !NOT_COMPARED.includes(k))
    : [...new Set([...Object.keys(mine), ...Object.keys(theirsRaw)])].filter((k) => !NOT_COMPARED.includes(k));
  const perField = item.method === "PATCH";
  const [pick, setPick] = useState<Record<string, "mine" | "theirs">>({});
  const chosen = (k: string) => pick[k] ?? "mine";
  const currentVersion = typeof theirsRaw.version === "number" ? theirsRaw.version : undefined;
  const withVersion = (body: Record<string, unknown>) => ({
    ...body,
    ...(currentVersion !== undefined ? { version: currentVersion } : {}),
  });
  const sendChoices = () => {
    const body = { ...(item.body as Record<string, unknown>) };
    for (const k of keys) if (chosen(k) === "theirs") delete body[k];
    const left = Object.keys(body).filter((k) => k !== "version");
    if (left.length === 0) return void discard(item.id); // every field kept as the server has it
    void resend(item.id, withVersion(body));
  };
  return (
    <li className="rounded-md border-l-4 border-brass-400 bg-hull-850 p-2" data-testid="outbox-conflict">
      <p className="font-semibold">{item.label}</p>
      <p className="text-sm text-brass-300">{item.error?.message}</p>
      <table className="mt-2 w-full text-left text-sm">
        <thead>
          <tr className="text-mist">
            <th scope="col" className="pr-2 font-semibold">
              Field
            </th>
            <th scope="col" className="pr-2 font-semibold">
              Yours (on this phone)
            </th>
            <th scope="col" className="font-semibold">
              On the server now
            </th>
          </tr>
        </thead>
        <tbody>
          {keys.map((k) => {
            const differs = mine[k] !== undefined && theirOf(k) !== undefined && mine[k] !== theirOf(k);
            const label = fieldLabel(item.kind, k);
            return (
              <tr key={k} className={differs ? "text-brass-300" : ""} data-testid={`conflict-${k}`}>
                <th scope="row" className="pr-2 font-normal text-mist">
                  {label}
                </th>
                <td className="pr-2">
                  {perField ? (
                    <label className="inline-flex min-h-11 items-center gap-1">
                      <input
                        type="radio"
                        name={`${item.id}-${k}`}
                        checked={chosen(k) === "mine"}
                        onChange={() => setPick({ ...pick, [k]: "mine" })}
                        aria-label={`${label}: keep yours`}
                      />
                      {shown(item.kind, k, mine[k])}
                    </label>
                  ) : (
                    shown(item.kind, k, mine[k])
                  )}
                </td>
                <td>
                  {perField ? (
                    <label className="inline-flex min-h-11 items-center gap-1">
                      <input
                        type="radio"
                        name={`${item.id}-${k}`}
                        checked={chosen(k) === "theirs"}
                        onChange={() => setPick({ ...pick, [k]: "theirs" })}
                        aria-label={`${label}: keep the server's`}
                      />
                      {shown(item.kind, compareAs[k] ?? k, theirOf(k))}
                    </label>
                  ) : (
                    shown(item.kind, compareAs[k] ?? k, theirOf(k))
                  )}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <div className="mt-2 flex flex-wrap gap-2 text-sm">
        <button
          type="button"
          className="min-h-11 rounded-md px-3 ring-1 ring-hull-500"
          onClick={() => void discard(item.id)}
        >
          Keep the server's (discard mine)
        </button>
        {perField ? (
          <button
            type="button"
            className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
            onClick={sendChoices}
          >
            Send my choices
          </button>
        ) : (
          <button
            type="button"
            className="min-h-11 rounded-md bg-brass-400 px-3 font-semibold text-hull-950"
            onClick={() => void resend(item.id, withVersion(item.body as Record<string, unknown>))}
          >
            Send mine over it
          </button>
        )}
      </div>
    </li>
  );
}
