/**
 * Guards for the numbers the computations of shared/ take: each refuses a value that is not a number
 * the computation can use with a RangeError that names the value and says what was expected, so a NaN
 * or an Infinity never flows silently into a count, a rank or a time.
 */

/**
 * The value if it is a finite number; otherwise a RangeError naming it.
 * @example finite('delay', Number.NaN) // throws "delay must be a finite number, not NaN"
 */
export function finite(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError(`${name} must be a finite number, not ${String(value)}`);
  return value;
}

/**
 * The value if it is a whole number of at least `min` (default 0); otherwise a RangeError naming it.
 * @example whole('headcount', 18) // 18
 */
export function whole(name: string, value: number, min = 0): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min) {
    throw new RangeError(`${name} must be a whole number of ${min} or more, not ${String(value)}`);
  }
  return value;
}

/**
 * The value if it is a finite number of at least `min`; otherwise a RangeError naming it.
 * @example atLeast('timebox', 15, 0) // 15
 */
export function atLeast(name: string, value: number, min: number): number {
  if (finite(name, value) < min) throw new RangeError(`${name} must be ${min} or more, not ${value}`);
  return value;
}
