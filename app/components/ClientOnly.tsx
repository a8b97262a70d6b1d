import { Suspense, useSyncExternalStore, type ReactNode } from "react";

const subscribe = () => () => {};

/** True in the browser after hydration, false on the server and during hydration. */
export function useHydrated() {
  return useSyncExternalStore(subscribe, () => true, () => false);
}

/**
 * Renders `children` only in the browser (they may be React.lazy components, loaded on demand);
 * the server and the first client render show `fallback`, a box of the chart's height, so the
 * page does not jump. Used for the recharts charts: the library is a separate chunk, loaded only
 * by the pages that draw a chart.
 */
export function ClientOnly({ children, fallback }: { children: ReactNode; fallback: ReactNode }) {
  const hydrated = useHydrated();
  return hydrated ? <Suspense fallback={fallback}>{children}</Suspense> : fallback;
}

export function ChartPlaceholder({ className, label = "Drawing the chart…" }: { className: string; label?: string }) {
  return (
    <div className={`${className} flex items-center justify-center rounded border border-dashed border-slate-200 text-xs text-slate-400`} aria-hidden="true">
      {label}
    </div>
  );
}
