import * as React from 'react';
import { cn } from '@/lib/utils';

/**
 * The message under a field always names the field ("Plate resistor: required"), so it still makes sense when read
 * alone (a screen reader's alert, a list of problems). A message that already starts with the label is kept.
 */
export function fieldMessage(label: string, message: string): string {
  const name = label.replace(/\s*\([^)]*\)\s*$/, '').trim();
  if (!name || message.toLowerCase().startsWith(name.toLowerCase())) return message;
  return `${name}: ${message}`;
}

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
          {fieldMessage(label, error)}
        </p>
      ) : hint ? (
        <p className="text-xs text-muted">{hint}</p>
      ) : null}
    </div>
  );
}
