/**
 * Throws unless `value` is a finite number above 0: TypeError `<name> must be a finite number of <unit>`, or
 * RangeError `<name> must be greater than 0 <unit> (got <value>)`, so a bad input never becomes a silent NaN.
 */
export function assertPositiveQuantity(name: string, value: number, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new TypeError(`${name} must be a finite number of ${unit}`);
  if (!(value > 0)) throw new RangeError(`${name} must be greater than 0 ${unit} (got ${value})`);
}
