import { useEffect, useMemo, useState } from 'react';

/** A callback ref that also keeps the element in `.current`, like a ref object. */
export type ElementRef<T extends HTMLElement> = ((node: T | null) => void) & { current: T | null };

/**
 * A ref for a container and its current width in CSS pixels (0 until laid out); plots size themselves from it.
 * The ref is a callback, so a container that mounts after the first render (a plot whose data arrives live) is
 * watched as well: a ref object read in a mount-only effect would miss it and leave the plot blank until a reload.
 */
export function useElementWidth<T extends HTMLElement = HTMLDivElement>() {
  const [element, setElement] = useState<T | null>(null);
  const [width, setWidth] = useState(0);
  const ref = useMemo(() => {
    const fn = ((node: T | null) => {
      fn.current = node;
      setElement(node);
    }) as ElementRef<T>;
    fn.current = null;
    return fn;
  }, []);
  useEffect(() => {
    if (!element) return;
    const ro = new ResizeObserver(([entry]) => setWidth(Math.floor(entry.contentRect.width)));
    ro.observe(element);
    return () => ro.disconnect();
  }, [element]);
  return [ref, width] as const;
}
