export default function Loading() {
  return (
    <div className="space-y-4" aria-busy="true" aria-label="Loading">
      <div className="h-7 w-64 animate-pulse rounded bg-rule/60" />
      <div className="h-4 w-96 animate-pulse rounded bg-rule/40" />
      <div className="h-64 animate-pulse rounded-lg bg-rule/30" />
    </div>
  );
}
