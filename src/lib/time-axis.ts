/** Tick labels for a time axis in seconds, in the unit that suits the visible span. */
export function timeTicks(splits: number[], span: number): string[] {
  const [scale, unit] = span < 2e-6 ? [1e9, 'ns'] : span < 2e-3 ? [1e6, 'µs'] : span < 2 ? [1e3, 'ms'] : [1, 's'];
  const step = splits.length > 1 ? Math.abs(splits[1] - splits[0]) * scale : 1;
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step)) + 1));
  return splits.map((s) => `${(s * scale).toFixed(decimals)} ${unit}`);
}
