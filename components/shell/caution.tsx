import { cn } from '@/lib/utils';

export function Caution({ className, compact = false }: { className?: string; compact?: boolean }) {
  return (
    <div role="note" aria-label="Safety caution" className={cn('flex items-start gap-2 rounded-md border border-near/40 bg-near/10 px-3 py-2 text-xs text-ink', className)}>
      <span aria-hidden className="mt-px font-bold text-near">⚠</span>
      <p>
        <b>Lethal voltages.</b> B+ and plate supplies in tube amplifiers can kill, and filter capacitors hold their charge after
        switch-off.{' '}
        {compact ? null : 'Figures here are estimates from tube models, to be confirmed by measurement with suitable instruments. '}
        Local electrical codes and licensed practice come first.
      </p>
    </div>
  );
}
