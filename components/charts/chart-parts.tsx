// Shared look for every chart: colours come from the theme's CSS variables so light and dark both read well.
import * as React from 'react';
import { ResponsiveContainer } from 'recharts';
import { cn } from '@/lib/utils';

export const COLORS = {
  curve: 'var(--curve)',
  ink: 'var(--ink)',
  muted: 'var(--muted)',
  rule: 'var(--rule)',
  sheet: 'var(--sheet)',
  heater: 'var(--heater)',
  dcline: 'var(--dcline)',
  acline: 'var(--acline)',
  limit: 'var(--limit)',
} as const;

export const TICK = { fill: COLORS.muted, fontSize: 11 } as const;
export const AXIS_LINE = { stroke: COLORS.rule } as const;
export const GRID = { stroke: COLORS.rule, strokeDasharray: '2 4', strokeOpacity: 0.8 } as const;
export const AXIS_LABEL = { fill: COLORS.muted, fontSize: 11 } as const;

/** Plain-number tick text: 0.5, 1, 250, 10k (no float noise). */
export function tickNumber(v: number): string {
  if (!Number.isFinite(v)) return '';
  const abs = Math.abs(v);
  if (abs >= 1000) return `${Number((v / 1000).toPrecision(3))}k`;
  return String(Number(v.toPrecision(4)));
}

/** A 1-2-5 step giving about `count` intervals over the span. */
export function niceStep(span: number, count = 6): number {
  if (!(span > 0) || !Number.isFinite(span)) return 1;
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10) * p;
}

/** Round-number ticks covering [min, max]; the domain should be widened to the first and last. */
export function niceTicks(min: number, max: number, count = 6): number[] {
  const step = niceStep(max - min, count);
  const start = Math.floor(min / step + 1e-9) * step;
  const end = Math.ceil(max / step - 1e-9) * step;
  const out: number[] = [];
  for (let v = start; v <= end + step * 1e-6; v += step) out.push(Number(v.toPrecision(10)));
  return out;
}

export type LegendEntry = { label: string; color: string; kind: 'line' | 'dashed' | 'dot' | 'cross' | 'bar' | 'thick' };

export function ChartLegend({ entries, className }: { entries: LegendEntry[]; className?: string }) {
  return (
    <ul className={cn('flex flex-wrap items-center gap-x-4 gap-y-1 px-1 text-xs text-muted', className)} aria-label="Legend">
      {entries.map((e) => (
        <li key={e.label} className="inline-flex items-center gap-1.5">
          <svg width="22" height="10" aria-hidden className="shrink-0">
            {e.kind === 'dot' ? (
              <circle cx="11" cy="5" r="4" fill={e.color} stroke={COLORS.sheet} strokeWidth="1" />
            ) : e.kind === 'cross' ? (
              <g stroke={e.color} strokeWidth="1.3">
                <line x1="8" y1="2" x2="14" y2="8" />
                <line x1="8" y1="8" x2="14" y2="2" />
              </g>
            ) : e.kind === 'bar' ? (
              <rect x="6" y="0" width="10" height="10" fill={e.color} rx="1" />
            ) : (
              <line
                x1="1"
                y1="5"
                x2="21"
                y2="5"
                stroke={e.color}
                strokeWidth={e.kind === 'thick' ? 2.5 : 1.75}
                strokeDasharray={e.kind === 'dashed' ? '4 3' : undefined}
              />
            )}
          </svg>
          <span className="text-ink">{e.label}</span>
        </li>
      ))}
    </ul>
  );
}

export function EmptyChart({ height, children }: { height: number; children: React.ReactNode }) {
  return (
    <div style={{ height }} className="flex items-center justify-center rounded-md border border-dashed border-rule text-sm text-muted">
      {children}
    </div>
  );
}

// The frame every engine chart shares: a labelled figure, faded while its result is stale, the chart sized to the
// given height, and an optional legend or note under it.
export function ChartFrame({ testId, label, stale, height, footer, children }: {
  testId: string;
  label: string;
  stale?: boolean;
  height: number;
  footer?: React.ReactNode;
  children: React.ReactElement;
}) {
  return (
    <figure data-testid={testId} data-stale={stale ? 'true' : 'false'} aria-label={label}>
      <div style={{ height }} className={stale ? 'opacity-60' : undefined}>
        <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height }}>
          {children}
        </ResponsiveContainer>
      </div>
      {footer}
    </figure>
  );
}
