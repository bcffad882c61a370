import { solveLinearSystem } from './solve-linear-system.ts';

/** The inverse of a small dense matrix, column by column with `solveLinearSystem`; null when it is singular. */
export function invertMatrix(a: readonly (readonly number[])[]): number[][] | null {
  const n = a.length;
  const columns: number[][] = [];
  for (let j = 0; j < n; j++) {
    const col = solveLinearSystem(a, Array.from({ length: n }, (_, i) => (i === j ? 1 : 0)));
    if (!col) return null;
    columns.push(col);
  }
  return Array.from({ length: n }, (_, i) => columns.map((col) => col[i]));
}
