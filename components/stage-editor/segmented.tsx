'use client';

import { useId, useRef } from 'react';
import { cn } from '@/lib/utils';

/**
 * A small segmented control with the keyboard behaviour of tabs: one tab stop, arrow keys (and Home / End) move
 * the selection, the panel below is labelled by the selected tab (`tabPanelProps`).
 */
export function Segmented<T extends string>({ value, options, onChange, label, idBase }: { value: T; options: { value: T; label: string }[]; onChange: (v: T) => void; label: string; idBase?: string }) {
  const auto = useId();
  const base = idBase ?? auto;
  const refs = useRef<(HTMLButtonElement | null)[]>([]);
  const move = (to: number) => {
    const n = options.length;
    const i = ((to % n) + n) % n;
    onChange(options[i]!.value);
    refs.current[i]?.focus();
  };
  const current = options.findIndex((o) => o.value === value);
  return (
    <div
      role="tablist"
      aria-label={label}
      className="inline-flex max-w-full flex-wrap rounded-md border border-rule bg-paper p-0.5"
      onKeyDown={(e) => {
        const keys: Record<string, number> = { ArrowRight: current + 1, ArrowDown: current + 1, ArrowLeft: current - 1, ArrowUp: current - 1, Home: 0, End: options.length - 1 };
        if (e.key in keys) {
          e.preventDefault();
          move(keys[e.key]!);
        }
      }}
    >
      {options.map((o, i) => (
        <button
          key={o.value}
          ref={(el) => {
            refs.current[i] = el;
          }}
          type="button"
          role="tab"
          id={`${base}-tab-${o.value}`}
          aria-controls={`${base}-panel`}
          aria-selected={o.value === value}
          tabIndex={o.value === value ? 0 : -1}
          onClick={() => onChange(o.value)}
          className={cn(
            'rounded px-2.5 py-1 text-xs font-medium transition-colors focus-visible:outline-2 focus-visible:outline-heater',
            o.value === value ? 'bg-sheet text-ink shadow-sm ring-1 ring-rule' : 'text-muted hover:text-ink',
          )}
        >
          {o.label}
        </button>
      ))}
    </div>
  );
}

/** Props for the panel a `Segmented` control switches (same `idBase`). */
export function tabPanelProps(idBase: string, value: string) {
  return { role: 'tabpanel' as const, id: `${idBase}-panel`, 'aria-labelledby': `${idBase}-tab-${value}`, tabIndex: 0 };
}
