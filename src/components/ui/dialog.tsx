import { useEffect, useRef, type ReactNode } from 'react';
import { X } from 'lucide-react';
import { cn } from '../../lib/cn';

/** A modal dialog on the native <dialog> element (focus trap and Escape come with it). */
export function Dialog({ open, onClose, title, children, className }: { open: boolean; onClose: () => void; title: string; children: ReactNode; className?: string }) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog
      ref={ref}
      // React passes a nested dialog's close event up to this one's handler: only this dialog's own closing counts.
      onClose={(e) => {
        if (e.target === e.currentTarget) onClose();
      }}
      aria-label={title}
      className={cn('m-auto w-[min(36rem,calc(100vw-2rem))] rounded-2xl border border-line bg-paper-raised p-0 text-ink shadow-2xl backdrop:bg-ink/40', className)}
    >
      {open && (
        <div className="max-h-[85dvh] overflow-y-auto">
          <div className="sticky top-0 flex items-center justify-between border-b border-line bg-paper-raised px-5 py-3">
            <h2 className="text-xl font-semibold">{title}</h2>
            <button type="button" onClick={onClose} className="grid size-11 place-items-center rounded-lg text-ink-muted hover:bg-paper-sunk" aria-label="Close">
              <X className="size-5" />
            </button>
          </div>
          <div className="p-5">{children}</div>
        </div>
      )}
    </dialog>
  );
}
