import * as React from 'react';
import { cn } from '@/lib/utils';

// A labelled form row: the unit sits beside the control, the explanation of a wrong value under it.
export function Field({
  label,
  htmlFor,
  unit,
  error,
  hint,
  className,
  children,
}: {
  label: string;
  htmlFor: string;
  unit?: string;
  error?: string;
  hint?: string;
  className?: string;
  children: React.ReactNode;
}) {
  return (
    <div className={cn('space-y-1', className)}>
      <label htmlFor={htmlFor} className="block text-xs font-medium text-muted">
        {label}
      </label>
      <div className="flex items-center gap-1.5">
        <div className="min-w-0 flex-1">{children}</div>
        {unit ? <span className="num w-8 shrink-0 text-xs text-muted">{unit}</span> : null}
      </div>
      {error ? (
        <p role="alert" id={`${htmlFor}-error`} className="text-xs text-over">
          {error}
        </p>
      ) : hint ? (
        <p className="text-xs text-muted">{hint}</p>
      ) : null}
    </div>
  );
}
