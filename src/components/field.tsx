import { useId, type ComponentProps, type ReactNode, type TextareaHTMLAttributes } from "react";

const control =
  "mt-1 block w-full min-h-11 rounded-md border border-hull-500 bg-hull-900 px-3 text-chalk placeholder:text-fog focus:border-brass-400 focus:outline-none aria-[invalid=true]:border-flare-400";

interface Wrap {
  label: ReactNode;
  error?: string;
  hint?: ReactNode;
  className?: string;
}

function Frame({ id, label, error, hint, className = "", children }: Wrap & { id: string; children: ReactNode }) {
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-sm font-semibold text-mist">
        {label}
      </label>
      {children}
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-fog">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1 text-sm text-flare-300" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

const describedBy = (id: string, error?: string, hint?: ReactNode) =>
  error ? `${id}-error` : hint ? `${id}-hint` : undefined;

export function TextField({ label, error, hint, className, ...rest }: Wrap & ComponentProps<"input">) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint} className={className}>
      <input
        id={id}
        aria-invalid={!!error}
        aria-describedby={describedBy(id, error, hint)}
        className={control}
        {...rest}
      />
    </Frame>
  );
}

export function SelectField({ label, error, hint, className, children, ...rest }: Wrap & ComponentProps<"select">) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint} className={className}>
      <select
        id={id}
        aria-invalid={!!error}
        aria-describedby={describedBy(id, error, hint)}
        className={control}
        {...rest}
      >
        {children}
      </select>
    </Frame>
  );
}

export function TextArea({
  label,
  error,
  hint,
  className,
  ...rest
}: Wrap & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const id = useId();
  return (
    <Frame id={id} label={label} error={error} hint={hint} className={className}>
      <textarea
        id={id}
        aria-invalid={!!error}
        aria-describedby={describedBy(id, error, hint)}
        className={`${control} py-2`}
        rows={3}
        {...rest}
      />
    </Frame>
  );
}

/**
 * A field whose label wraps its input (a label that reads as part of a sentence, a compact row), with
 * its message below: `children` gets the message's id for the input's aria-describedby.
 */
export function WithMessage({
  error,
  className,
  children,
}: {
  error?: string;
  className?: string;
  children: (describedBy: string | undefined) => ReactNode;
}) {
  const id = useId();
  return (
    <div className={className}>
      {children(error ? id : undefined)}
      {error && (
        <p id={id} role="alert" className="mt-1 text-sm text-flare-300">
          {error}
        </p>
      )}
    </div>
  );
}
