import { useEffect, useState, type RefObject } from 'react';

/** The element's width in whole CSS pixels, followed with a ResizeObserver; 0 until it is laid out. */
export function useElementWidth(ref: RefObject<HTMLElement | null>): number {
  const [width, setWidth] = useState(0);
  useEffect(() => {
    const el = ref.current;
    if (el === null) return;
    const observer = new ResizeObserver(() => setWidth(Math.floor(el.clientWidth)));
    observer.observe(el);
    setWidth(Math.floor(el.clientWidth));
    return () => observer.disconnect();
  }, [ref]);
  return width;
}
