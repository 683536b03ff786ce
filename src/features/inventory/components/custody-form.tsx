import { useMemo, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { TextField } from "../../../components/field";
import { CUSTODY, CUSTODY_LABELS, type Custody } from "../../../domain/vocab";
import { checkCustodyMove, proposeNext, type CustodyFacts } from "../../../domain/custody-chain";
import { ApiError } from "../../../lib/api-client";
import { fieldError, formMessage, showSaveError, useSchemaForm } from "../../../lib/form";
import { custodyBody, type CustodyMove, type CustodyOptions, type CustodyRefusalDto } from "../../../schemas/inventory";
import { fetchNextTag, useCustodyOptions, useMoveCustody } from "../api";
import type { Component } from "../contract";
import { ConflictNotice } from "./conflict-notice";

type Held = Pick<Component, "id" | "custody" | "version" | "tagNumber"> &
  Partial<Pick<Component, "kind" | "disposition">> & { custodyLocation?: string };

/**
 * With no signal and no answer kept for this part: the chain's options worked out on the phone with the same rules
 * (src/domain/custody-chain.ts) from what the phone holds. A reading it does not hold counts as not recorded, so a
 * move that needs one shows as needing its proof; the server judges the move again when it arrives.
 */
function optionsOnPhone(c: Held, latest: Latest | undefined): CustodyOptions | null {
  if (!c.kind) return null;
  const facts: CustodyFacts = {
    from: c.custody,
    kind: c.kind,
    disposition: c.disposition ?? null,
    tagNumber: c.tagNumber,
    latestInsulation: latest?.insulation ?? null,
    latestMechanism: latest?.mechanism ?? null,
    latestReading: null,
  };
  return {
    proposed: proposeNext(facts),
    moves: CUSTODY.filter((s) => s !== c.custody).map((to) => ({ to, refusals: checkCustodyMove(facts, to) })),
  };
}
type Latest = { insulation: CustodyFacts["latestInsulation"]; mechanism: CustodyFacts["latestMechanism"] };
const LABELS = { custody: "Where it is", custodyLocation: "Location", tagNumber: "Tag" };

/** A stale version's 409 carries the record as it is now (a chain refusal's 409 carries its rules instead). */
const conflictOf = (e: unknown) =>
  e instanceof ApiError && e.status === 409 && e.code === "conflict" && e.current ? (e.current as Held) : null;
/** The move chosen: the person's own pick, else the server's proposal. */
const moveTo = (picked: string, options: CustodyOptions | undefined): Custody | null =>
  (picked as Custody) || options?.proposed || null;
/** The chain's refusals of a move that still stand: a typed tag answers "tag required". */
const standing = (options: CustodyOptions | undefined, to: Custody | null, tag: string): CustodyRefusalDto[] =>
  (options?.moves.find((m) => m.to === to)?.refusals ?? []).filter((r) => !(r.rule === "tag_required" && tag.trim()));

/**
 * The form's text → the request body (without the version: the record's, added on sending);
 * custodyBody (the server's own schema) validates it. The tag goes only when an untagged part is
 * removed, the release reason only when the chain refuses the move.
 */
const custodyForm = (tagged: boolean, options: CustodyOptions | undefined) =>
  z
    .object({
      toState: z.string(),
      location: z.string(),
      note: z.string(),
      tagNumber: z.string(),
      releaseReason: z.string(),
    })
    .transform((v) => {
      const to = moveTo(v.toState, options);
      const needsTag = !tagged && to === "removed";
      return {
        toState: to ?? "",
        location: v.location,
        note: v.note,
        ...(needsTag && v.tagNumber.trim() ? { tagNumber: v.tagNumber } : {}),
        ...(standing(options, to, v.tagNumber).length && v.releaseReason.trim()
          ? { releaseReason: v.releaseReason }
          : {}),
      } as Omit<z.input<typeof custodyBody>, "version">;
    })
    .pipe(custodyBody.omit({ version: true }));
type CustodyFormValues = z.input<ReturnType<typeof custodyForm>>;
const EMPTY: CustodyFormValues = { toState: "", location: "", note: "", tagNumber: "", releaseReason: "" };

/**
 * Log a move of the part along the tag-and-return chain (src/domain/custody-chain.ts): the
 * server's proposal is chosen first, each move it would refuse says why, a removal asks for a
 * tag (typed, scanned with a keyboard-wedge scanner, or generated), and the curator may
 * release a refused move with a written reason.
 */
export function CustodyForm({
  siteId,
  component,
  label,
  canRelease,
  onSaved,
  latestInspection,
}: {
  siteId: string;
  component: Held;
  /** The newest inspection the phone holds, for the chain's options worked out with no signal. */
  latestInspection?: Latest;
  /** The position's designation, for the outbox's list when saved with no signal. */
  label: string;
  canRelease: boolean;
  /** The move as saved, or, with no signal, the outbox item it waits in and where it goes. */
  onSaved: (saved: { move: CustodyMove } | { queuedId: string; toState: Custody }) => void;
}) {
  // The record the form started from (its version goes with the move): not an input.
  const [base, setBase] = useState<Held>(component);
  const asked = useCustodyOptions(siteId, base.id);
  const onPhone = !asked.data && asked.fetchStatus === "paused";
  const phoneOptions = useMemo(
    () => (onPhone ? optionsOnPhone(base, latestInspection) : null),
    [onPhone, base, latestInspection],
  );
  const options = { data: asked.data ?? phoneOptions ?? undefined, isFetching: asked.isFetching };
  const move = useMoveCustody(siteId);
  const schema = useMemo(() => custodyForm(!!base.tagNumber, options.data), [base.tagNumber, options.data]);
  const form = useSchemaForm(schema, EMPTY);
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: keyof CustodyFormValues) => fieldError(errors, name);
  // An empty pick is the server's proposal: derived on each render, so a refetch of the options
  // after a save can never leave the form with no move chosen.
  const [picked, tag, release] = form.watch(["toState", "tagNumber", "releaseReason"]);
  const to = moveTo(picked, options.data);

  const conflict = conflictOf(move.error);
  const needsTag = !base.tagNumber && to === "removed";
  const refusals = standing(options.data, to, tag);
  const releasable = refusals.length > 0 && refusals.every((r) => r.releasable);
  const blocked = refusals.length > 0 && !(canRelease && releasable && release.trim().length >= 5);
  // A stale version shows as the conflict notice below, not as a message.
  const message = conflict ? null : formMessage(errors, "above");

  const save = (version: number) =>
    form.handleSubmit((body) =>
      move.mutateAsync({ ...body, componentId: base.id, version, label }).then(
        (r) => {
          if (r.queued) {
            // Waiting in the outbox: show the move as made, so the next one follows from it.
            setBase({ ...base, custody: body.toState, tagNumber: base.tagNumber ?? body.tagNumber ?? null });
          } else setBase(r.data.component);
          form.reset(EMPTY);
          onSaved(r.queued ? { queuedId: r.item.id, toState: body.toState } : { move: r.data.move });
        },
        (err: unknown) => {
          if (!conflictOf(err)) showSaveError(form, err);
        },
      ),
    )();
  const generate = () => {
    form.clearErrors("tagNumber");
    fetchNextTag(siteId).then(
      (r) => form.setValue("tagNumber", r.tagNumber),
      () => form.setError("tagNumber", { message: "No tag could be generated: type one." }),
    );
  };
  const choose = (c: Custody) => {
    form.setValue("toState", c);
    form.clearErrors();
    move.reset();
  };
  const moves = options.data?.moves ?? [];
  const ordered = [...moves].sort((a, b) =>
    a.to === options.data?.proposed ? -1 : b.to === options.data?.proposed ? 1 : a.refusals.length - b.refusals.length,
  );
  return (
    <form
      onSubmit={(ev) => {
        ev.preventDefault();
        void save(base.version);
      }}
      noValidate
      className="space-y-3"
      aria-label="Log a custody move"
    >
      <p className="text-sm">
        Now: <strong data-testid="custody-now">{CUSTODY_LABELS[base.custody]}</strong>
        {base.tagNumber && <span className="font-mono text-mist"> · tag {base.tagNumber}</span>}
      </p>
      {onPhone && (
        <p className="text-sm text-mist" data-testid="custody-on-phone">
          {phoneOptions
            ? "No signal: these moves are worked out on this phone from what it kept. The server checks the move again when it arrives."
            : "No signal, and the moves this part can make are not kept on this phone yet: they show when the connection returns."}
        </p>
      )}
      {options.data && (
        <p className="text-sm text-mist" data-testid="custody-proposal">
          {options.data.proposed ? (
            <>
              Next on the chain: <strong className="text-chalk">{CUSTODY_LABELS[options.data.proposed]}</strong>
            </>
          ) : (
            "The chain is complete here: choose a move only if the part moves again."
          )}
        </p>
      )}
      <fieldset>
        <legend className="text-sm font-semibold text-mist">Move it to</legend>
        <div className="mt-1 grid grid-cols-2 gap-2">
          {ordered.map((m) => (
            <button
              key={m.to}
              type="button"
              aria-pressed={to === m.to}
              onClick={() => choose(m.to)}
              className={`min-h-12 rounded-md px-3 py-1 text-left font-semibold ring-1 ${to === m.to ? "bg-tide-300 text-hull-950 ring-tide-300" : m.refusals.length ? "bg-hull-850 text-mist ring-hull-700" : "bg-hull-800 ring-hull-600"}`}
            >
              {CUSTODY_LABELS[m.to]}
              {m.refusals.some((r) => r.rule !== "tag_required") && (
                <span className="block text-xs font-normal">
                  {m.refusals.some((r) => r.status === 409) ? "✕ not on the chain" : "△ needs a proof"}
                </span>
              )}
            </button>
          ))}
        </div>
      </fieldset>
      {refusals.length > 0 && (
        <div
          role="note"
          aria-label="What this move still needs"
          className="rounded-md border-l-4 border-rust-400 bg-hull-850 p-2 text-sm"
          data-testid="custody-refusals"
        >
          <ul className="list-disc space-y-1 pl-5">
            {refusals.map((r) => (
              <li key={r.rule}>{r.message}</li>
            ))}
          </ul>
          {canRelease && releasable ? (
            <TextField
              label="Release it anyway — the reason is recorded and shown"
              {...register("releaseReason")}
              placeholder="e.g. refitted for a dry fit only, locked out"
              error={e("releaseReason")}
              className="mt-2"
            />
          ) : (
            <p className="mt-1 text-mist">
              {releasable ? "The curator can release it with a written reason." : "Fix this first."}
            </p>
          )}
        </div>
      )}
      {needsTag && (
        <div className="flex items-end gap-2">
          <TextField
            label="Tag number on the bag"
            {...register("tagNumber")}
            error={e("tagNumber")}
            className="flex-1 [&_input]:font-mono"
            required
            autoComplete="off"
          />
          <Button type="button" tone="quiet" className="mb-0.5" onClick={generate}>
            Generate a tag
          </Button>
        </div>
      )}
      <TextField
        label="Where is it now?"
        placeholder="e.g. workshop bench 2, crate B"
        {...register("location")}
        error={e("location")}
      />
      <TextField label="Note (optional)" {...register("note")} error={e("note")} />
      {conflict && (
        <ConflictNotice
          base={base}
          current={conflict}
          labels={LABELS}
          busy={move.isPending}
          onUseTheirs={() => {
            setBase(conflict);
            form.setValue("toState", "");
            move.reset();
          }}
          onApplyMine={() => {
            setBase(conflict);
            void save(conflict.version);
          }}
        />
      )}
      {message && (
        <p role="alert" className="text-sm text-flare-300">
          {message}
        </p>
      )}
      <Button
        type="submit"
        className="w-full min-h-14 text-lg"
        disabled={move.isPending || options.isFetching || !to || blocked}
      >
        {move.isPending
          ? "Saving…"
          : to
            ? `Save move: ${CUSTODY_LABELS[to]}${refusals.length && !blocked ? " (released)" : ""}`
            : "Choose where it went"}
      </Button>
    </form>
  );
}
