/**
 * Input guards shared by the domain modules. An impossible input (NaN, a negative
 * resistance, a percentage above 100) is a programming or data-entry error, not an
 * expected outcome, so it throws RangeError with the parameter's name in the message.
 */

export interface Bounds {
  /** Lowest allowed value (inclusive unless `minExclusive`). */
  min?: number;
  /** Highest allowed value (inclusive unless `maxExclusive`). */
  max?: number;
  minExclusive?: boolean;
  maxExclusive?: boolean;
  /** Allow +Infinity (e.g. an open-circuit fault resistance). */
  allowInfinity?: boolean;
}

/** Throws RangeError unless `value` is a number within `bounds`; returns it otherwise. */
export function requireNumber(name: string, value: number, bounds: Bounds = {}): number {
  if (typeof value !== "number" || Number.isNaN(value)) {
    throw new RangeError(`${name} must be a number, got ${String(value)}`);
  }
  if (!Number.isFinite(value) && !(bounds.allowInfinity && value === Infinity)) {
    throw new RangeError(`${name} must be finite, got ${String(value)}`);
  }
  const { min, max, minExclusive, maxExclusive } = bounds;
  if (min !== undefined && (minExclusive ? value <= min : value < min)) {
    throw new RangeError(`${name} must be ${minExclusive ? "above" : "at least"} ${min}, got ${value}`);
  }
  if (max !== undefined && (maxExclusive ? value >= max : value > max)) {
    throw new RangeError(`${name} must be ${maxExclusive ? "below" : "at most"} ${max}, got ${value}`);
  }
  return value;
}

/** Throws RangeError unless `value` is a positive finite number (> 0). */
export function requirePositive(name: string, value: number): number {
  return requireNumber(name, value, { min: 0, minExclusive: true });
}

/** Throws RangeError unless `value` is one of `allowed`. */
export function requireOneOf<T extends string>(name: string, value: T, allowed: readonly T[]): T {
  if (!allowed.includes(value)) {
    throw new RangeError(`${name} must be one of ${allowed.join(", ")}, got ${String(value)}`);
  }
  return value;
}
