import { REVIEW_DECISION_LABELS, shotStatusLabel } from '../../../shared/contracts/shot-status.ts';
import type { CsvValue } from './to-csv.ts';

/**
 * CSV files are read by people (in a spreadsheet), so the status columns carry the pages' words ("Signed off",
 * "Returned", "Awaiting files"); the JSON export is for scripts and keeps the API's values ("approved").
 */
const WORDS: Record<string, (v: CsvValue) => CsvValue> = {
  status: (v) => (typeof v === 'string' ? shotStatusLabel(v) : v),
  reviewDecision: (v) => (typeof v === 'string' ? REVIEW_DECISION_LABELS[v as keyof typeof REVIEW_DECISION_LABELS] ?? v : v),
};

/** A row's value under `key` as a person reads it in the CSV. */
export function csvWords(key: string, value: CsvValue): CsvValue {
  const word = WORDS[key];
  return word ? word(value) : value;
}
