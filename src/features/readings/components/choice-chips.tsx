import type { UseFormRegisterReturn } from "react-hook-form";

/**
 * A row of large radio "chips" for gloved fingers in a dim space: each at least 48 px high,
 * the chosen one in solid brass with a tick, so the choice reads without colour.
 */
export function ChoiceChips<T extends string>({
  legend,
  name,
  options,
  value,
  onChange,
  defaultValue,
  registered,
  className = "",
}: {
  legend: string;
  name: string;
  options: ReadonlyArray<readonly [T, string]>;
  /** Controlled when given; otherwise the form reads `name` on submit. */
  value?: T;
  onChange?: (v: T) => void;
  defaultValue?: T;
  /** A react-hook-form field (`registered={register("action")}`): the form holds the choice. */
  registered?: UseFormRegisterReturn;
  className?: string;
}) {
  return (
    <fieldset className={`sm:col-span-2 ${className}`}>
      <legend className="text-sm font-semibold text-mist">{legend}</legend>
      <div className="mt-1 grid grid-cols-2 gap-2 sm:flex sm:flex-wrap">
        {options.map(([v, label]) => (
          <label
            key={v}
            className="flex min-h-12 cursor-pointer items-center gap-2 rounded-md bg-hull-900 px-3 text-base font-semibold ring-1 ring-hull-500 has-[:checked]:bg-brass-400 has-[:checked]:text-hull-950 has-[:checked]:ring-brass-300 has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-brass-300"
          >
            <input
              type="radio"
              name={registered?.name ?? name}
              value={v}
              className="h-5 w-5 accent-hull-950"
              {...(registered
                ? { onChange: registered.onChange, onBlur: registered.onBlur, ref: registered.ref }
                : value !== undefined
                  ? { checked: value === v, onChange: () => onChange?.(v) }
                  : { defaultChecked: defaultValue === v })}
            />
            {label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}
