/**
 * A byte count for people: "1.20 GB", "340 kB", "512 bytes". Decimal units (SI prefixes, 1 kB = 1000 bytes), as
 * disks are sold and most file managers count; three significant digits.
 */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) throw new RangeError('bytes must be a finite number of 0 or more');
  const units = ['bytes', 'kB', 'MB', 'GB', 'TB', 'PB'];
  let value = bytes;
  let unit = 0;
  while (value >= 999.5 && unit < units.length - 1) {
    value /= 1000;
    unit++;
  }
  return unit === 0 ? `${bytes} bytes` : `${value.toPrecision(3)} ${units[unit]}`;
}
