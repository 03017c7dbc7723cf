import { useEffect, useState } from 'react';

/**
 * True once the element given the returned ref has come within `margin` of the viewport, and from then on. For parts
 * of a screen that are costly to load and sit below the first view (the compare screen's trends chart): they load
 * when the user scrolls towards them, not with the screen. A callback ref, so an element mounted later is observed.
 */
export function useSeen<T extends Element>(margin = '300px'): [(el: T | null) => void, boolean] {
  const [el, setEl] = useState<T | null>(null);
  const [seen, setSeen] = useState(false);
  useEffect(() => {
    if (seen || !el) return;
    if (typeof IntersectionObserver === 'undefined') {
      setSeen(true);
      return;
    }
    const io = new IntersectionObserver((entries) => entries.some((e) => e.isIntersecting) && setSeen(true), { rootMargin: margin });
    io.observe(el);
    return () => io.disconnect();
  }, [el, seen, margin]);
  return [setEl, seen];
}
