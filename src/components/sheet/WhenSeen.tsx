import { Suspense, useEffect, useRef, useState, type ReactNode } from 'react';

/**
 * Renders its children (typically a React.lazy component, so its code and libraries load then) once
 * the placeholder has come within `margin` of the viewport, or as soon as `early` turns true; until
 * then and while the code loads it shows `fallback`. Once shown, the children stay; `onShow` hears
 * that moment (e.g. to start computing what the children will show).
 */
export default function WhenSeen({
  children,
  fallback,
  early = false,
  margin = '300px',
  onShow,
}: {
  children: ReactNode;
  fallback: ReactNode;
  early?: boolean;
  margin?: string;
  onShow?: () => void;
}) {
  const box = useRef<HTMLDivElement>(null);
  const [seen, setSeen] = useState(false);
  const show = seen || early;

  useEffect(() => {
    const element = box.current;
    if (!element || show) return;
    const observer = new IntersectionObserver((entries) => {
      if (entries.some((entry) => entry.isIntersecting)) setSeen(true);
    }, { rootMargin: margin });
    observer.observe(element);
    return () => observer.disconnect();
  }, [show, margin]);

  useEffect(() => {
    if (show) onShow?.();
  }, [show, onShow]);

  return <div ref={box}>{show ? <Suspense fallback={fallback}>{children}</Suspense> : fallback}</div>;
}
