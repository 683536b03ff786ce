import { useState, type FormEvent } from "react";
import { Button } from "../../../components/button";
import { SelectField, TextArea, TextField } from "../../../components/field";
import { MoneyField } from "../../../components/money-field";
import { HERITAGE_RULE_LABELS, HERITAGE_RULES, type HeritageRule } from "../../../domain/vocab";
import { ApiError } from "../../../lib/api-client";
import type { PartLine } from "../../../schemas/parts";
import { useSetHeritageRule, useUpdateLine } from "../api";

function useOutcome() {
  const [message, setMessage] = useState<string | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const fail = (e: unknown) => {
    setMessage(
      e instanceof ApiError
        ? e.status === 409
          ? "Someone changed this line meanwhile; the page now shows their version. Try again."
          : e.message
        : "That did not work.",
    );
    if (e instanceof ApiError) setErrors(e.fields);
  };
  return {
    message,
    errors,
    ok: (m: string) => {
      setErrors({});
      setMessage(m);
    },
    fail,
  };
}

/** The curator's call: how strictly the replacement must follow the original. */
export function HeritageRuleForm({ siteId, line }: { siteId: string; line: PartLine }) {
  const set = useSetHeritageRule(siteId, line.id);
  const o = useOutcome();
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        const rule = new FormData(e.currentTarget).get("heritageRule") as HeritageRule;
        set.mutate(
          { version: line.version, heritageRule: rule },
          { onSuccess: () => o.ok("Heritage rule saved."), onError: o.fail },
        );
      }}
    >
      <SelectField
        label="Heritage rule (curator)"
        name="heritageRule"
        defaultValue={line.heritageRule}
        key={line.version}
        className="min-w-64"
      >
        {HERITAGE_RULES.map((r) => (
          <option key={r} value={r}>
            {HERITAGE_RULE_LABELS[r]}
          </option>
        ))}
      </SelectField>
      <Button type="submit" tone="quiet" disabled={set.isPending}>
        Set rule
      </Button>
      {o.message && (
        <p role="status" className="text-mist">
          {o.message}
        </p>
      )}
    </form>
  );
}

const numOrNull = (v: FormDataEntryValue | null) => (v === null || String(v).trim() === "" ? null : Number(v));

export function LineEditForm({ siteId, line }: { siteId: string; line: PartLine }) {
  const update = useUpdateLine(siteId, line.id);
  const o = useOutcome();
  function submit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    update.mutate(
      {
        version: line.version,
        notes: String(f.get("notes")),
        estimatedUnitCost: numOrNull(f.get("estimatedUnitCost")),
        manualQty: Number(f.get("manualQty") || 0),
      },
      { onSuccess: () => o.ok("Saved."), onError: o.fail },
    );
  }
  return (
    <form
      onSubmit={submit}
      key={line.version}
      className="grid gap-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700 sm:grid-cols-2"
      aria-labelledby="edit-title"
    >
      <h2 id="edit-title" className="text-lg font-bold sm:col-span-2">
        Working notes
      </h2>
      <MoneyField
        label="Estimated unit cost"
        name="estimatedUnitCost"
        defaultValue={line.estimatedUnitCost ?? ""}
        error={o.errors.estimatedUnitCost}
      />
      <TextField
        label="Extra quantity (spares)"
        name="manualQty"
        type="number"
        min={0}
        defaultValue={line.manualQty}
        error={o.errors.manualQty}
        hint="Added to what the positions need"
      />
      <TextArea
        label="Internal notes (never shared)"
        name="notes"
        defaultValue={line.notes}
        className="sm:col-span-2"
        error={o.errors.notes}
      />
      <div className="flex items-center gap-3 sm:col-span-2">
        <Button type="submit" disabled={update.isPending}>
          Save
        </Button>
        {o.message && (
          <p role="status" className="text-mist">
            {o.message}
          </p>
        )}
      </div>
    </form>
  );
}
