import type { InputHTMLAttributes, ReactNode } from "react";
import { useMoney } from "../lib/money";
import { TextField } from "./field";

/**
 * A number field for an amount in the site's currency: the label names the ISO code
 * ("Cost (CAD)"), the step follows ISO 4217's minor unit, the phone shows its decimal pad.
 */
export function MoneyField({
  label,
  ...rest
}: { label: string; error?: string; hint?: ReactNode; className?: string } & Omit<
  InputHTMLAttributes<HTMLInputElement>,
  "type" | "step" | "inputMode"
>) {
  const m = useMoney();
  return <TextField label={m.label(label)} type="number" step={m.step} inputMode="decimal" min={0} {...rest} />;
}
