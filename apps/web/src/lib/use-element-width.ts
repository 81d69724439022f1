import { useEffect, useLayoutEffect, useState, type RefObject } from 'react';

/**
 * The element's content width in whole pixels, following resizes. NOTE: measured
 * synchronously before paint too, so a plot's first draw does not wait a frame for the
 * ResizeObserver's first report.
 */
export function useElementWidth(ref: RefObject<HTMLElement | null>): number {
  const [width, setWidth] = useState(0);
  useLayoutEffect(() => {
    const initial = Math.floor(ref.current?.clientWidth ?? 0);
    if (initial > 0) setWidth(initial);
  }, [ref]);
  useEffect(() => {
    const element = ref.current;
    if (!element || typeof ResizeObserver === 'undefined') return;
    const observer = new ResizeObserver((entries) => {
      const next = Math.floor(entries[0]?.contentRect.width ?? 0);
      setWidth((previous) => (previous === next ? previous : next));
    });
    observer.observe(element);
    return () => observer.disconnect();
  }, [ref]);
  return width;
}
