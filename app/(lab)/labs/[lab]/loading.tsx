/** Shown while a lab page's data loads: the page's shape, quietly pulsing. */
export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading" className="animate-pulse space-y-6">
      <div className="space-y-2">
        <div className="h-3 w-32 rounded bg-line" />
        <div className="h-7 w-64 rounded bg-line" />
        <div className="h-3 w-96 max-w-full rounded bg-line/70" />
      </div>
      <div className="grid gap-5 xl:grid-cols-[2.2fr_1fr]">
        <div className="h-96 rounded-xl border border-line bg-card" />
        <div className="h-96 rounded-xl border border-line bg-card" />
      </div>
    </div>
  );
}
