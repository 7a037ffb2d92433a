import { useCallback, useEffect, useState } from 'react';

/**
 * Watches a box that may scroll sideways (a wide table in a narrow window). While it does, it
 * must be reachable by keyboard and named, or keyboard users cannot scroll it (WCAG 2.1.1).
 */
export function useSidewaysOverflow<E extends HTMLElement>() {
  const [element, setElement] = useState<E | null>(null);
  const [overflowing, setOverflowing] = useState(false);
  const ref = useCallback((node: E | null) => setElement(node), []);

  useEffect(() => {
    if (!element || typeof ResizeObserver === 'undefined') return;
    const measure = () => setOverflowing(element.scrollWidth > element.clientWidth + 1);
    measure();
    const observer = new ResizeObserver(measure);
    observer.observe(element);
    if (element.firstElementChild) observer.observe(element.firstElementChild);
    return () => observer.disconnect();
  }, [element]);

  return { ref, overflowing };
}

/** The attributes a sideways-scrolling box needs: a tab stop, a region role and a name. */
export function scrollRegionProps(name: { labelledBy?: string; label?: string }) {
  return {
    tabIndex: 0,
    role: 'region',
    ...(name.labelledBy ? { 'aria-labelledby': name.labelledBy } : { 'aria-label': name.label }),
  } as const;
}
