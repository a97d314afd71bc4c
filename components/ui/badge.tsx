import { cva, type VariantProps } from 'class-variance-authority';
import * as React from 'react';
import { cn } from '@/lib/utils';

export const badgeVariants = cva('inline-flex items-center gap-1 rounded px-1.5 py-0.5 text-xs font-medium', {
  variants: {
    tone: {
      neutral: 'bg-rule/50 text-ink',
      ok: 'bg-ok/15 text-ok',
      near: 'bg-near/15 text-near',
      over: 'bg-over/15 text-over',
      accent: 'bg-heater/15 text-heater-ink',
      info: 'bg-dcline/15 text-dcline',
    },
  },
  defaultVariants: { tone: 'neutral' },
});

export function Badge({ className, tone, ...props }: React.HTMLAttributes<HTMLSpanElement> & VariantProps<typeof badgeVariants>) {
  return <span className={cn(badgeVariants({ tone }), className)} {...props} />;
}

const STATUS_TONE = {
  ok: 'ok', near: 'near', over: 'over', under: 'over', 'not-checked': 'neutral', 'not-modelled': 'neutral',
  pass: 'ok', check: 'near', fail: 'over',
  sent: 'ok', queued: 'info', failed: 'over',
  approved: 'ok', submitted: 'info', 'in-review': 'info', 'changes-requested': 'near', draft: 'neutral',
} as const;
const STATUS_WORD: Record<string, string> = { 'not-checked': 'not checked', 'not-modelled': 'not modelled', 'changes-requested': 'changes requested', 'in-review': 'in review' };

// Status is always a word as well as a colour.
export function StatusBadge({ status, className }: { status: keyof typeof STATUS_TONE; className?: string }) {
  return (
    <Badge tone={STATUS_TONE[status]} className={className} data-status={status}>
      {STATUS_WORD[status] ?? status}
    </Badge>
  );
}
