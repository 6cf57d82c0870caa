'use client';

import { useEffect, useRef, useState, type RefObject } from 'react';

/**
 * The width of a chart's container, followed as the window narrows or widens, so charts redraw
 * at their real size instead of being scaled (scaled SVG text becomes unreadable on phones).
 */
export function useChartWidth<T extends HTMLElement>(fallback = 640): [RefObject<T | null>, number] {
  const ref = useRef<T>(null);
  const [width, setWidth] = useState(fallback);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const update = () => setWidth(Math.max(240, Math.floor(el.getBoundingClientRect().width)));
    update();
    const observer = new ResizeObserver(update);
    observer.observe(el);
    return () => observer.disconnect();
  }, []);
  return [ref, width];
}
