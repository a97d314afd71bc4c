import { cva, type VariantProps } from 'class-variance-authority';
import * as React from 'react';
import { cn } from '@/lib/utils';

export const buttonVariants = cva(
  'inline-flex items-center justify-center gap-1.5 whitespace-nowrap rounded-md text-sm font-medium transition-colors focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-heater disabled:pointer-events-none disabled:opacity-50',
  {
    variants: {
      variant: {
        primary: 'bg-heater text-white hover:brightness-95 dark:text-[#1b1208]',
        secondary: 'border border-rule bg-sheet text-ink hover:bg-paper',
        ghost: 'text-ink hover:bg-rule/40',
        danger: 'border border-over/50 bg-sheet text-over hover:bg-over/10',
      },
      size: { sm: 'h-8 px-2.5', md: 'h-9 px-3.5', lg: 'h-10 px-5' },
    },
    defaultVariants: { variant: 'primary', size: 'md' },
  },
);

export type ButtonProps = React.ButtonHTMLAttributes<HTMLButtonElement> & VariantProps<typeof buttonVariants>;

export const Button = React.forwardRef<HTMLButtonElement, ButtonProps>(({ className, variant, size, ...props }, ref) => (
  <button ref={ref} className={cn(buttonVariants({ variant, size }), className)} {...props} />
));
Button.displayName = 'Button';
