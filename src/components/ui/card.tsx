import type { HTMLAttributes } from 'react';
import { cn } from '../../lib/cn';

export function Card({ className, ...props }: HTMLAttributes<HTMLDivElement>) {
  return <div className={cn('rounded-xl border border-line bg-paper-raised shadow-[0_1px_0_rgba(0,0,0,0.03)]', className)} {...props} />;
}

export function CardHeader({ title, action, className }: { title: string; action?: React.ReactNode; className?: string }) {
  return (
    <div className={cn('flex items-center justify-between gap-3 border-b border-line px-5 py-3', className)}>
      <h2 className="text-lg font-semibold">{title}</h2>
      {action}
    </div>
  );
}
