import type { CSSProperties, ReactNode } from 'react';
import { ImageOff } from 'lucide-react';
import { cn } from '../../../lib/cn';
import { useImage, type PhotoSource } from '../api/compare';
import { useContainFit } from './use-contain-fit';

/**
 * One clinical photo on the neutral grey surround (DESIGN §9: no coloured frame, nothing that tints skin). The image
 * is shown once it is downloaded and decoded, so a comparison never shows one new photo beside one stale one.
 */
export function PhotoFrame({
  source,
  alt,
  className,
  style,
  overlay,
  eager,
  emptyLabel = 'No photo of this view at this visit',
}: {
  source: PhotoSource | null;
  alt: string;
  className?: string;
  style?: CSSProperties;
  overlay?: ReactNode;
  /** Paint as soon as possible (the pair on screen); strip frames load lazily instead. */
  eager?: boolean;
  emptyLabel?: string;
}) {
  const img = useImage(eager ? (source?.src ?? null) : null);
  const ready = !eager || img.isSuccess;
  const { ref, box } = useContainFit<HTMLDivElement>(source ? source.width / source.height : null);
  return (
    <div ref={ref} style={style} className={cn('relative grid place-items-center overflow-hidden bg-photo-surround', className)}>
      {!source ? (
        <div className="flex flex-col items-center gap-2 p-6 text-center text-sm text-white/85">
          <ImageOff className="size-6" aria-hidden />
          {emptyLabel}
        </div>
      ) : ready ? (
        <div className="relative" style={box ? { width: box.width, height: box.height } : { width: '100%', height: '100%' }}>
          <img
            src={source.src}
            alt={alt}
            width={source.width}
            height={source.height}
            loading={eager ? 'eager' : 'lazy'}
            decoding="async"
            draggable={false}
            data-photo-src={source.src}
            className="block size-full select-none object-contain"
          />
          {overlay}
        </div>
      ) : img.isError ? (
        <p className="p-6 text-center text-sm text-white/85">This photo could not be loaded. Check the connection and try again.</p>
      ) : (
        <span className="size-7 animate-spin rounded-full border-2 border-white/50 border-r-transparent" role="status" aria-label="Loading photo" />
      )}
    </div>
  );
}
