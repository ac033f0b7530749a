export default function Loading() {
  return (
    <div role="status" aria-label="Loading" className="space-y-6">
      <div className="h-8 w-48 animate-pulse rounded-lg bg-surface-sunken" />
      <div className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3">
        {[0, 1, 2].map((i) => (
          <div key={i} className="h-52 animate-pulse card bg-surface-sunken" />
        ))}
      </div>
    </div>
  );
}
