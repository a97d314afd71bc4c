// Anodyne's mark: a plate over a glowing cathode, drawn as three strokes.
export function Logo({ className }: { className?: string }) {
  return (
    <span className={className}>
      <svg viewBox="0 0 24 24" width="22" height="22" aria-hidden className="inline-block align-[-5px]">
        <rect x="3" y="3" width="18" height="3" rx="1" fill="currentColor" />
        <path d="M5 12h14" stroke="currentColor" strokeWidth="1.5" strokeDasharray="2 2" />
        <rect x="6" y="17" width="12" height="3" rx="1.5" fill="var(--heater)" />
      </svg>
      <span className="ml-1.5 text-[17px] font-semibold tracking-tight">Anodyne</span>
    </span>
  );
}
