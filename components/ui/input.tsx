import * as React from 'react';
import { cn } from '@/lib/utils';

export const Input = React.forwardRef<HTMLInputElement, React.InputHTMLAttributes<HTMLInputElement>>(({ className, ...props }, ref) => (
  <input
    ref={ref}
    className={cn(
      'h-9 w-full rounded-md border border-rule bg-sheet px-2.5 text-sm text-ink placeholder:text-muted focus:border-heater focus:outline-none focus:ring-2 focus:ring-heater/30 aria-[invalid=true]:border-over disabled:cursor-not-allowed disabled:border-dashed disabled:bg-transparent read-only:border-dashed read-only:bg-transparent read-only:focus:ring-0',
      className,
    )}
    {...props}
  />
));
Input.displayName = 'Input';

export const Select = React.forwardRef<HTMLSelectElement, React.SelectHTMLAttributes<HTMLSelectElement>>(({ className, ...props }, ref) => (
  <select
    ref={ref}
    className={cn('h-9 w-full rounded-md border border-rule bg-sheet px-2 text-sm text-ink focus:border-heater focus:outline-none focus:ring-2 focus:ring-heater/30 disabled:cursor-not-allowed disabled:border-dashed disabled:bg-transparent disabled:appearance-none', className)}
    {...props}
  />
));
Select.displayName = 'Select';

export const Textarea = React.forwardRef<HTMLTextAreaElement, React.TextareaHTMLAttributes<HTMLTextAreaElement>>(({ className, ...props }, ref) => (
  <textarea
    ref={ref}
    className={cn('min-h-20 w-full rounded-md border border-rule bg-sheet px-2.5 py-2 text-sm text-ink focus:border-heater focus:outline-none focus:ring-2 focus:ring-heater/30 disabled:cursor-not-allowed disabled:border-dashed disabled:bg-transparent read-only:border-dashed read-only:bg-transparent read-only:focus:ring-0', className)}
    {...props}
  />
));
Textarea.displayName = 'Textarea';
