import { AlertTriangle, CheckCircle2 } from 'lucide-react';
import { cn } from '../../../lib/cn';
import type { PairComparison } from '../types';

/**
 * Whether the two photos can be read side by side, said plainly: an honest comparison is part of the product.
 * Warnings never block; they explain what to keep in mind.
 */
export function PairNotes({ pair, tone = 'light', compact }: { pair: PairComparison; tone?: 'light' | 'dark'; compact?: boolean }) {
  const single = [
    ...pair.baseline.warnings.map((w) => ({ ...w, who: 'Baseline' })),
    ...pair.followUp.warnings.map((w) => ({ ...w, who: 'Follow-up' })),
  ];
  const dark = tone === 'dark';
  if (pair.comparable && !single.length) {
    if (compact) return null;
    return (
      <p className={cn('flex items-center gap-2 text-sm', dark ? 'text-white/85' : 'text-done')} role="status">
        <CheckCircle2 className="size-4 shrink-0" aria-hidden /> Both photos are aligned to the same frame, with no pose or capture differences found.
      </p>
    );
  }
  return (
    <div
      role="note"
      aria-label="Comparison notes"
      className={cn('rounded-lg border px-4 py-3 text-sm leading-relaxed', dark ? 'border-white/25 bg-black/35 text-white' : 'border-warn/30 bg-warn-soft text-[#6f4507]')}
    >
      {!pair.comparable && (
        <>
          <p className="flex items-center gap-2 font-semibold">
            <AlertTriangle className="size-4 shrink-0" aria-hidden /> These two photos are not directly comparable
          </p>
          <ul className="mt-1 list-disc space-y-0.5 pl-6">
            {pair.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
        </>
      )}
      {single.length > 0 && !compact && (
        <>
          <p className={cn('font-semibold', !pair.comparable && 'mt-2')}>{pair.comparable ? 'Capture notes' : 'Also'}</p>
          <ul className="mt-1 list-disc space-y-0.5 pl-6">
            {single.map((w) => (
              <li key={w.who + w.code}>
                <span className="font-medium">{w.who}:</span> {w.message}
              </li>
            ))}
          </ul>
        </>
      )}
    </div>
  );
}
