import { useLayoutEffect, useRef, useState } from 'react';

/**
 * The size of a box with aspect ratio `ratio` (width / height) fitted inside the measured container, like
 * `object-fit: contain`, so an overlay drawn in the photo's own coordinates lines up with the photo exactly.
 */
export function useContainFit<T extends HTMLElement>(ratio: number | null) {
  const ref = useRef<T>(null);
  const [box, setBox] = useState<{ width: number; height: number } | null>(null);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el || !ratio) return;
    const fit = () => {
      const { width: cw, height: ch } = el.getBoundingClientRect();
      if (!cw || !ch) return;
      const width = Math.min(cw, ch * ratio);
      setBox({ width: Math.floor(width), height: Math.floor(width / ratio) });
    };
    fit();
    const ro = new ResizeObserver(fit);
    ro.observe(el);
    return () => ro.disconnect();
  }, [ratio]);
  return { ref, box };
}
