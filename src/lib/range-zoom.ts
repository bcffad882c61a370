import { useCallback, useEffect, type KeyboardEvent, type RefObject } from 'react';

/** An interval of the time axis, s. */
export interface Range { from: number; to: number }

/** Narrowest range a zoom may reach, s: a few nanoseconds. */
export const MIN_SPAN = 1e-9;

/** Scale `range` by `factor` about the instant `centre` (its middle when not given): below 1 zooms in. */
export function zoomAround(range: Range, factor: number, centre = (range.from + range.to) / 2): Range {
  return { from: centre - (centre - range.from) * factor, to: centre + (range.to - centre) * factor };
}

/** Shift `range` by `fraction` of its own span (negative: earlier), kept inside `record` when one is given. */
export function panBy(range: Range, fraction: number, record?: Range | null): Range {
  const span = range.to - range.from;
  let from = range.from + fraction * span;
  if (record) from = Math.min(Math.max(from, record.from), record.to - span);
  return { from, to: from + span };
}

/**
 * `range` kept within `record`: never narrower than MIN_SPAN, never starting before the record nor ending after it.
 * Null when what is left covers (almost) the whole record, which callers read as "not zoomed".
 */
export function clampToRecord(range: Range, record: Range): Range | null {
  const span = Math.max(range.to - range.from, MIN_SPAN);
  const from = Math.max(record.from, range.from);
  const to = Math.min(record.to, from + span);
  return to - from >= (record.to - record.from) * 0.999 ? null : { from, to };
}

/** The instant under the pointer at `clientX` over a plot area spanning `left`..`left + width` pixels. */
export function instantAt(range: Range, clientX: number, area: { left: number; width: number }): number {
  return range.from + ((clientX - area.left) / area.width) * (range.to - range.from);
}

/** Zoom factor for one wheel step: rolling away from the user (deltaY < 0) zooms in. */
export const wheelFactor = (deltaY: number) => (deltaY < 0 ? 0.8 : 1.25);

export type RangeKeyAction = { zoom: number } | { pan: number } | 'reset';

/** What a key does to the range of focused plots: + and − zoom, ← and → pan, 0 or Esc resets; null for other keys. */
export function rangeKeyAction(key: string): RangeKeyAction | null {
  if (key === '+' || key === '=') return { zoom: 0.5 };
  if (key === '-' || key === '_') return { zoom: 2 };
  if (key === 'ArrowLeft') return { pan: -0.2 };
  if (key === 'ArrowRight') return { pan: 0.2 };
  if (key === '0' || key === 'Escape') return 'reset';
  return null;
}

/**
 * Wheel and keyboard zoom for a group of uPlot plots sharing one time range. The mouse wheel over any plot area
 * (`.u-over`) inside `box` zooms around the pointer; `onKeyDown`, put on a focusable element holding the plots, maps
 * keys through `rangeKeyAction`. `setRange` receives unclamped ranges (clamp there); `reset` undoes any zoom; pans
 * stay inside `record` and do nothing without one (no record: nothing recorded to pan over).
 */
export function useRangeZoom({ box, current, setRange, reset, record }: {
  box: RefObject<HTMLElement | null>;
  current: Range | null;
  setRange: (range: Range) => void;
  reset: () => void;
  record?: Range | null;
}) {
  const zoom = useCallback((factor: number, centre?: number) => {
    if (current) setRange(zoomAround(current, factor, centre));
  }, [current, setRange]);

  const pan = useCallback((fraction: number) => {
    if (current && record) setRange(panBy(current, fraction, record));
  }, [current, record, setRange]);

  useEffect(() => {
    const el = box.current;
    if (!el || !current) return;
    const onWheel = (e: WheelEvent) => {
      const plotEl = (e.target as HTMLElement).closest('.u-over') as HTMLElement | null;
      if (!plotEl) return;
      e.preventDefault();
      zoom(wheelFactor(e.deltaY), instantAt(current, e.clientX, plotEl.getBoundingClientRect()));
    };
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => el.removeEventListener('wheel', onWheel);
  }, [box, current, zoom]);

  const onKeyDown = useCallback((e: KeyboardEvent) => {
    const action = rangeKeyAction(e.key);
    if (action === null) return;
    if (action === 'reset') reset();
    else if ('zoom' in action) zoom(action.zoom);
    else pan(action.pan);
    e.preventDefault();
  }, [pan, reset, zoom]);

  return { zoom, pan, onKeyDown };
}
