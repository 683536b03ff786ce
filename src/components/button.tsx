import type { ButtonHTMLAttributes, Ref } from "react";

type Tone = "primary" | "quiet" | "danger";
const TONES: Record<Tone, string> = {
  primary: "bg-brass-400 text-hull-950 hover:bg-brass-300 disabled:bg-hull-600 disabled:text-mist",
  quiet: "bg-hull-800 text-chalk ring-1 ring-hull-600 hover:bg-hull-700 disabled:text-fog",
  danger: "bg-flare-700 text-chalk ring-1 ring-flare-400 hover:bg-flare-400 hover:text-hull-950",
};

/** At least 44 px tall: gloved fingers on a phone. */
export function Button({
  tone = "primary",
  className = "",
  ...rest
}: ButtonHTMLAttributes<HTMLButtonElement> & { tone?: Tone }) {
  return (
    <button
      type="button"
      className={`inline-flex min-h-11 items-center justify-center gap-2 rounded-md px-4 font-semibold transition-colors disabled:cursor-not-allowed ${TONES[tone]} ${className}`}
      {...rest}
    />
  );
}

/** The × that closes a drawer or panel: 44 px square, named for what it closes (`label`). */
export function CloseButton({
  label,
  onClick,
  ref,
}: {
  label: string;
  onClick: () => void;
  ref?: Ref<HTMLButtonElement>;
}) {
  return (
    <button
      ref={ref}
      type="button"
      onClick={onClick}
      className="min-h-11 min-w-11 rounded-md text-2xl ring-1 ring-hull-600 hover:bg-hull-700"
      aria-label={label}
    >
      ×
    </button>
  );
}
