import { toNestErrors } from '@hookform/resolvers';
import type { FieldError, FieldValues, Resolver } from 'react-hook-form';
import type * as z from 'zod';
import { parseLabNumber } from '../../campaigns/utils/lab-units.ts';

/** Reads the numbers typed in lab units; each unreadable one is noted against its field. */
export class LabNumberReader {
  readonly problems: { field: string; message: string }[] = [];

  /** A number from a text field, times `toSi` (e.g. 1e-3 for mm → m); null when blank. */
  number(field: string, text: string | undefined, toSi: (x: number) => number = (x) => x): number | null {
    const x = parseLabNumber(text);
    if (x === null) return null;
    if (Number.isNaN(x)) {
      this.problems.push({ field, message: 'Enter a number, e.g. 1.5 (a decimal comma is fine).' });
      return null;
    }
    return toSi(x);
  }
}

export interface SiFormResolverOptions<Values extends FieldValues> {
  /** Builds the request body in SI units from the form's values (lab units); unreadable numbers go to `read.problems`. */
  toBody: (values: Values, read: LabNumberReader) => unknown;
  /** The schema the server validates the body with: the one source of the rules. */
  schema: z.ZodType;
  /** The form field that shows a schema issue (e.g. `tubePressurePa` → `tubePressure`, `gates.1.position_m` → `gates.1.positionMm`). */
  fieldOf: (path: PropertyKey[]) => string;
}

/**
 * A react-hook-form resolver for forms that take lab units (mm, g, kPa, °C): converts to SI, validates with the API's
 * own zod schema, and shows each issue under the field the person typed into. Submitting yields the SI body.
 */
export function siFormResolver<Values extends FieldValues, Body>(options: SiFormResolverOptions<Values>): Resolver<Values, unknown, Body> {
  return (values, _context, resolverOptions) => {
    const read = new LabNumberReader();
    const body = options.toBody(values, read);
    const errors: Record<string, FieldError> = {};
    for (const p of read.problems) errors[p.field] ??= { type: 'number', message: p.message };
    const result = options.schema.safeParse(body);
    if (!result.success) {
      for (const issue of result.error.issues) {
        const field = options.fieldOf(issue.path) || 'root';
        errors[field] ??= { type: issue.code, message: issue.message };
      }
    }
    if (Object.keys(errors).length > 0 || !result.success) {
      return { values: {}, errors: toNestErrors(errors, resolverOptions) };
    }
    return { values: result.data as Body, errors: {} };
  };
}
