export function PlotSkeleton({ height }: { height: number }) {
  return <div aria-hidden="true" className="w-full animate-pulse rounded-md bg-ink-900/[0.05]" style={{ height }} />;
}
