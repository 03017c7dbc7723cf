import { cn } from '../../../lib/cn';

/** A determinate progress bar (0–1) announced to screen readers as a percentage. */
export function ProgressBar({ value, label, tone = 'accent', className }: { value: number; label: string; tone?: 'accent' | 'done' | 'danger'; className?: string }) {
  const pct = Math.round(Math.max(0, Math.min(1, value)) * 100);
  return (
    <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} className={cn('h-2 w-full overflow-hidden rounded-full bg-paper-sunk', className)}>
      <div
        className={cn('h-full rounded-full transition-[width] duration-150', tone === 'done' ? 'bg-done' : tone === 'danger' ? 'bg-danger' : 'bg-accent')}
        style={{ width: `${pct}%` }}
      />
    </div>
  );
}
