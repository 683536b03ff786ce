import { useFormContext } from "react-hook-form";
import { SelectField, TextField } from "../../../components/field";
import { fieldError } from "../../../lib/form";
import type { TargetOption } from "./form-bits";

/** What a reading is taken on: a component of the board, or a circuit named by hand. */
export interface CircuitTarget {
  componentId: string;
  circuit: string;
}

/** The typed circuit, or the chosen component's when left empty (the readings forms' rule). */
export function circuitOf(target: CircuitTarget, options: TargetOption[]): string {
  const typed = target.circuit.trim();
  return typed || (options.find((o) => o.componentId === target.componentId)?.circuit ?? "");
}

/** The name a queued reading is listed under on the phone: the component's designation, else the circuit. */
export function targetLabel(componentId: string | null, circuit: string, options: TargetOption[]): string {
  return options.find((o) => o.componentId === componentId)?.designation ?? circuit;
}

/**
 * Component and circuit, shared by the readings forms that may be taken on either (insulation, phase
 * comparison). Used inside a react-hook-form `FormProvider` whose values include `CircuitTarget`.
 */
export function CircuitTargetFields({ options, noneLabel }: { options: TargetOption[]; noneLabel: string }) {
  const {
    register,
    formState: { errors },
  } = useFormContext<CircuitTarget>();
  return (
    <>
      <SelectField label="Component" {...register("componentId")} error={fieldError(errors, "componentId")}>
        <option value="">{noneLabel}</option>
        {options.map((o) => (
          <option key={o.componentId} value={o.componentId}>
            {o.designation}
            {o.circuit && ` · ${o.circuit}`}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Circuit"
        {...register("circuit")}
        hint="Filled from the component when left empty"
        error={fieldError(errors, "circuit")}
      />
    </>
  );
}
