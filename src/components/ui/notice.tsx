import { cva, type VariantProps } from 'class-variance-authority';
import type { ReactNode } from 'react';
import { cn } from '../../lib/cn';

const notice = cva('rounded-lg border px-4 py-3 text-sm leading-relaxed', {
  variants: {
    tone: {
      info: 'border-line bg-paper-sunk text-ink-muted',
      warn: 'border-warn/30 bg-warn-soft text-[#6f4507]',
      danger: 'border-danger/30 bg-danger-soft text-danger',
      done: 'border-done/30 bg-done-soft text-done',
    },
  },
  defaultVariants: { tone: 'info' },
});

/** A plain message block: cautions, warnings, errors. */
export function Notice({ tone, title, children, className }: VariantProps<typeof notice> & { title?: string; children: ReactNode; className?: string }) {
  return (
    <div role={tone === 'danger' ? 'alert' : 'note'} className={cn(notice({ tone }), className)}>
      {title && <p className="mb-0.5 font-semibold">{title}</p>}
      {children}
    </div>
  );
}
