import { formatLineNumber } from './format-line-number.ts';

/**
 * The one error the importer throws for a file it cannot read. `message` is written for the person holding the
 * file ("line 2,041: expected 3 numbers, found 'ERR'"); `line` is the 1-based line it is about, or null when the
 * problem is not tied to one line (empty file, options that contradict each other).
 */
export class ImportError extends Error {
  readonly line: number | null;
  /** The bare reason, without the "line N: " prefix, for interfaces that show the line apart. */
  readonly reason: string;
  /** 'time-repeats': the time column repeats a time (maybe printed too coarsely: the caller may re-plan). */
  readonly code: 'time-repeats' | null;

  constructor(reason: string, line: number | null = null, code: 'time-repeats' | null = null) {
    super(line === null ? reason : `line ${formatLineNumber(line)}: ${reason}`);
    this.name = 'ImportError';
    this.line = line;
    this.reason = reason;
    this.code = code;
  }
}

/** True for the error of a time column that repeats a time, which a re-plan with `coarseTime` may read. */
export function isRepeatedTime(error: unknown): error is ImportError {
  return error instanceof ImportError && error.code === 'time-repeats';
}
