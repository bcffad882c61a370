/** 2041 → "2,041": line numbers are read by people, and deep records have long ones. */
export function formatLineNumber(line: number): string {
  return Math.trunc(line).toString().replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}
