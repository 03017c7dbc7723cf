import { cva, type VariantProps } from 'class-variance-authority';
import type { ButtonHTMLAttributes } from 'react';
import { cn } from '../../lib/cn';

export const buttonVariants = cva(
  'inline-flex min-h-11 select-none items-center justify-center gap-2 rounded-lg px-4 text-[15px] font-medium transition-colors disabled:cursor-not-allowed disabled:opacity-50',
  {
    variants: {
      variant: {
        primary: 'bg-accent text-white shadow-sm hover:bg-accent-strong',
        secondary: 'border border-line-strong bg-paper-raised text-ink hover:bg-paper-sunk',
        ghost: 'text-ink-muted hover:bg-paper-sunk hover:text-ink',
        done: 'bg-done text-white hover:brightness-110',
        danger: 'border border-danger/40 bg-paper-raised text-danger hover:bg-danger-soft',
      },
      size: { md: '', sm: 'min-h-9 px-3 text-sm', lg: 'min-h-12 px-6 text-base', icon: 'min-w-11 px-0' },
    },
    defaultVariants: { variant: 'secondary', size: 'md' },
  },
);

export type ButtonProps = ButtonHTMLAttributes<HTMLButtonElement> & VariantProps<typeof buttonVariants> & { busy?: boolean };

export function Button({ className, variant, size, busy, disabled, children, type = 'button', ...props }: ButtonProps) {
  return (
    <button type={type} className={cn(buttonVariants({ variant, size }), className)} disabled={disabled || busy} aria-busy={busy || undefined} {...props}>
      {busy && <span className="size-4 animate-spin rounded-full border-2 border-current border-r-transparent" aria-hidden />}
      {children}
    </button>
  );
}
