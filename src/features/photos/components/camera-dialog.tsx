import { useCallback, useEffect, useRef, useState } from 'react';
import { Camera, RefreshCw, SwitchCamera } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { Notice } from '../../../components/ui/notice';

type Facing = 'environment' | 'user';

function cameraError(err: unknown): string {
  const name = (err as { name?: string })?.name;
  if (name === 'NotAllowedError' || name === 'SecurityError') {
    return 'Camera access was refused. Allow the camera for this site in the browser settings, or use "Device camera" on the view instead.';
  }
  if (name === 'NotFoundError' || name === 'OverconstrainedError') return 'No camera was found on this device. Use "Device camera" or upload the photo instead.';
  if (name === 'NotReadableError') return 'The camera is in use by another app. Close it and try again.';
  return 'The camera could not be started. Use "Device camera" or upload the photo instead.';
}

/**
 * The in-page camera for one view. The same view from the patient's previous visit lies over the live picture,
 * semi-transparent and adjustable, so the pose and framing can be matched before taking the photo.
 */
export function CameraDialog({
  open,
  onClose,
  viewLabel,
  hint,
  overlayUrl,
  overlayDate,
  onCapture,
}: {
  open: boolean;
  onClose: () => void;
  viewLabel: string;
  hint?: string;
  overlayUrl: string | null;
  overlayDate?: string;
  onCapture: (photo: Blob) => void;
}) {
  const video = useRef<HTMLVideoElement>(null);
  const stream = useRef<MediaStream | null>(null);
  const [facing, setFacing] = useState<Facing>('environment');
  const [error, setError] = useState<string | null>(null);
  const [live, setLive] = useState(false);
  const [shot, setShot] = useState<{ blob: Blob; url: string; width: number; height: number } | null>(null);
  const [opacity, setOpacity] = useState(0.4);
  const [scale, setScale] = useState(1);
  const [showOverlay, setShowOverlay] = useState(true);

  const stop = useCallback(() => {
    stream.current?.getTracks().forEach((t) => t.stop());
    stream.current = null;
    setLive(false);
  }, []);

  useEffect(() => {
    if (!open) return;
    let cancelled = false;
    setError(null);
    const start = async () => {
      if (!navigator.mediaDevices?.getUserMedia) {
        setError('This browser offers no in-page camera here. Use "Device camera" or upload the photo instead.');
        return;
      }
      try {
        const s = await navigator.mediaDevices.getUserMedia({
          video: { facingMode: { ideal: facing }, width: { ideal: 4096 }, height: { ideal: 3072 } },
          audio: false,
        });
        if (cancelled) {
          s.getTracks().forEach((t) => t.stop());
          return;
        }
        stream.current = s;
        if (video.current) {
          video.current.srcObject = s;
          await video.current.play().catch(() => undefined);
        }
        setLive(true);
      } catch (err) {
        if (!cancelled) setError(cameraError(err));
      }
    };
    void start();
    return () => {
      cancelled = true;
      stop();
    };
  }, [open, facing, stop]);

  useEffect(() => () => {
    if (shot) URL.revokeObjectURL(shot.url);
  }, [shot]);

  const take = () => {
    const v = video.current;
    if (!v || !v.videoWidth) return;
    const canvas = document.createElement('canvas');
    canvas.width = v.videoWidth;
    canvas.height = v.videoHeight;
    canvas.getContext('2d')!.drawImage(v, 0, 0);
    canvas.toBlob(
      (blob) => {
        if (blob) setShot({ blob, url: URL.createObjectURL(blob), width: canvas.width, height: canvas.height });
      },
      'image/jpeg',
      0.92,
    );
  };

  const close = () => {
    setShot(null);
    stop();
    onClose();
  };

  return (
    <Dialog open={open} onClose={close} title={`Camera · ${viewLabel}`} className="w-[min(72rem,calc(100vw-1rem))]">
      <div className="space-y-3">
        {hint && <p className="text-sm text-ink-muted">{hint}</p>}
        {error && <Notice tone="danger">{error}</Notice>}
        <div className="relative grid h-[min(46dvh,40rem)] place-items-center overflow-hidden rounded-lg bg-photo-surround-deep">
          <video ref={video} playsInline muted aria-label="Live camera picture" className={shot ? 'hidden' : 'h-full w-full object-contain'} />
          {!shot && overlayUrl && showOverlay && live && (
            <img
              src={overlayUrl}
              alt="Previous visit, same view"
              data-testid="camera-overlay"
              className="pointer-events-none absolute inset-0 h-full w-full object-contain"
              style={{ opacity, transform: `scale(${scale})` }}
            />
          )}
          {shot && <img src={shot.url} alt="The photo just taken" className="h-full w-full object-contain" />}
          {!live && !shot && !error && <p className="absolute text-white/80">Starting the camera…</p>}
        </div>
        {!shot && overlayUrl && (
          <fieldset className="grid gap-3 rounded-lg border border-line px-4 py-3 sm:grid-cols-[auto_1fr_1fr]">
            <legend className="px-1 text-sm text-ink-muted">Previous visit{overlayDate ? ` (${overlayDate})` : ''} as a guide</legend>
            <label className="flex min-h-11 items-center gap-2 text-sm">
              <input type="checkbox" checked={showOverlay} onChange={(e) => setShowOverlay(e.target.checked)} className="size-5 accent-[var(--color-accent)]" /> Show
            </label>
            <label className="flex min-h-11 items-center gap-3 text-sm">
              <span className="w-20 shrink-0">Strength</span>
              <input type="range" min={0.1} max={0.9} step={0.05} value={opacity} onChange={(e) => setOpacity(Number(e.target.value))} className="w-full" aria-label="Guide strength" />
            </label>
            <label className="flex min-h-11 items-center gap-3 text-sm">
              <span className="w-20 shrink-0">Size</span>
              <input type="range" min={0.6} max={1.6} step={0.02} value={scale} onChange={(e) => setScale(Number(e.target.value))} className="w-full" aria-label="Guide size" />
            </label>
          </fieldset>
        )}
        <div className="flex flex-wrap items-center justify-between gap-2">
          <Button variant="ghost" disabled={!!shot} onClick={() => setFacing((f) => (f === 'environment' ? 'user' : 'environment'))}>
            <SwitchCamera className="size-4" /> Switch camera
          </Button>
          {shot ? (
            <div className="flex gap-2">
              <Button onClick={() => setShot(null)}>
                <RefreshCw className="size-4" /> Take again
              </Button>
              <Button
                variant="primary"
                onClick={() => {
                  onCapture(shot.blob);
                  close();
                }}
              >
                Save photo
              </Button>
            </div>
          ) : (
            <Button variant="primary" size="lg" disabled={!live} onClick={take}>
              <Camera className="size-5" /> Take photo
            </Button>
          )}
        </div>
      </div>
    </Dialog>
  );
}
