import { useEffect, useRef, useState } from 'react';
import { ImageUp, ScanLine } from 'lucide-react';
import { Gs1Error, parseGs1, type Gs1Data } from '../../server/lib/gs1';
import { Button } from './ui/button';
import { Dialog } from './ui/dialog';
import { Field, Input } from './ui/field';
import { Notice } from './ui/notice';

export interface ScannedLabel {
  data: Gs1Data;
  /** The element string as read, e.g. "]d20109…". */
  text: string;
  /** The photo of the label when the code was read from one, so it can be kept with the record. */
  photo: File | null;
}

type Reader = typeof import('../lib/barcode-browser');

function cameraError(err: unknown): string {
  const name = (err as { name?: string })?.name;
  if (name === 'NotAllowedError' || name === 'SecurityError') return 'Camera access was refused. Allow the camera for this site, or read the code from a photo of the label.';
  if (name === 'NotFoundError' || name === 'OverconstrainedError') return 'No camera was found. Read the code from a photo of the label, or type it.';
  if (name === 'NotReadableError') return 'The camera is in use by another app. Close it and try again.';
  return 'The camera could not be started. Read the code from a photo of the label, or type it.';
}

/**
 * Reads the GS1 code on a syringe or vial label: live from the tablet's camera, from a photo of the label, or typed
 * (a handheld scanner types it too). Only a valid GS1 code is handed on; anything else says why and changes nothing.
 */
export function LabelScanner({ open, onClose, onScan, title = 'Scan the label' }: { open: boolean; onClose: () => void; onScan: (label: ScannedLabel) => void; title?: string }) {
  const video = useRef<HTMLVideoElement>(null);
  const canvas = useRef<HTMLCanvasElement | null>(null);
  const [reader, setReader] = useState<Reader | null>(null);
  const [live, setLive] = useState(false);
  const [cameraProblem, setCameraProblem] = useState<string | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [typed, setTyped] = useState('');
  const [busy, setBusy] = useState(false);
  // The read loop calls the latest handler without restarting the camera when the parent re-renders.
  const onScanRef = useRef(onScan);
  onScanRef.current = onScan;

  useEffect(() => {
    if (!open || reader) return;
    import('../lib/barcode-browser').then(setReader, () => setProblem('The code reader could not be loaded. Type the code instead.'));
  }, [open, reader]);

  // The camera and a read loop while the dialog is open: about five frames a second until a GS1 code is read.
  useEffect(() => {
    if (!open || !reader) return;
    let stream: MediaStream | null = null;
    let stopped = false;
    let timer: ReturnType<typeof setTimeout> | undefined;
    canvas.current ??= document.createElement('canvas');
    const tick = async () => {
      if (stopped) return;
      const v = video.current;
      const pixels = v && v.readyState >= 2 ? reader.pixelsOf(v, canvas.current!) : null;
      if (pixels) {
        const read = await reader.readLabelInBrowser(pixels).catch(() => null);
        if (stopped) return;
        if (read?.ok) {
          onScanRef.current({ data: read.data, text: read.text, photo: null });
          return;
        }
        // A frame without a code is normal while aiming; a wrong code is worth saying.
        if (read && read.reason !== 'no-code') setProblem(read.message);
      }
      timer = setTimeout(tick, 200);
    };
    (async () => {
      if (!navigator.mediaDevices?.getUserMedia) {
        setCameraProblem('This browser offers no camera here. Read the code from a photo of the label, or type it.');
        return;
      }
      try {
        stream = await navigator.mediaDevices.getUserMedia({ video: { facingMode: { ideal: 'environment' }, width: { ideal: 1920 }, height: { ideal: 1080 } }, audio: false });
        if (stopped) return stream.getTracks().forEach((t) => t.stop());
        if (video.current) {
          video.current.srcObject = stream;
          await video.current.play().catch(() => undefined);
        }
        setLive(true);
        void tick();
      } catch (err) {
        if (!stopped) setCameraProblem(cameraError(err));
      }
    })();
    return () => {
      stopped = true;
      clearTimeout(timer);
      stream?.getTracks().forEach((t) => t.stop());
      setLive(false);
    };
  }, [open, reader]);

  const fromPhoto = async (file: File) => {
    if (!reader) return;
    setBusy(true);
    setProblem(null);
    try {
      const bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
      const pixels = reader.pixelsOf(bitmap, (canvas.current ??= document.createElement('canvas')));
      bitmap.close();
      const read = pixels ? await reader.readLabelInBrowser(pixels) : null;
      if (read?.ok) onScan({ data: read.data, text: read.text, photo: file });
      else setProblem(read?.message ?? 'That file could not be read as a picture.');
    } catch {
      setProblem('That file could not be read as a picture.');
    } finally {
      setBusy(false);
    }
  };

  const fromText = () => {
    try {
      onScan({ data: parseGs1(typed), text: typed.trim(), photo: null });
    } catch (e) {
      setProblem(e instanceof Gs1Error ? e.message : 'That is not a GS1 code.');
    }
  };

  const close = () => {
    setProblem(null);
    setCameraProblem(null);
    setTyped('');
    onClose();
  };

  return (
    <Dialog open={open} onClose={close} title={title} className="w-[min(44rem,calc(100vw-1rem))]">
      <div className="space-y-3">
        <p className="text-sm text-ink-muted">Hold the GS1 code on the box, syringe or vial inside the frame. Product, lot and expiry are filled in from it; check them against the label.</p>
        {cameraProblem ? (
          <Notice tone="warn">{cameraProblem}</Notice>
        ) : (
          <div className="relative grid h-[min(40dvh,22rem)] place-items-center overflow-hidden rounded-lg bg-photo-surround-deep">
            <video ref={video} playsInline muted aria-label="Live camera picture for the label code" className="h-full w-full object-contain" />
            <div className="pointer-events-none absolute inset-[18%] rounded-lg border-2 border-white/70" aria-hidden />
            {!live && <p className="absolute text-white/80">Starting the camera…</p>}
            {live && (
              <p className="absolute bottom-2 flex items-center gap-2 rounded bg-ink/60 px-2 py-1 text-sm text-white" aria-live="polite">
                <ScanLine className="size-4" aria-hidden /> Looking for a code…
              </p>
            )}
          </div>
        )}
        {problem && (
          <Notice tone="danger" title="Not filled in">
            {problem}
          </Notice>
        )}
        <div className="flex flex-wrap items-end gap-3">
          <label className="inline-flex">
            <input
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              aria-label="Photo of the label"
              onChange={(e) => {
                const f = e.target.files?.[0];
                e.target.value = '';
                if (f) void fromPhoto(f);
              }}
            />
            <span className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-4 text-[15px] font-medium hover:bg-paper-sunk">
              <ImageUp className="size-4" aria-hidden /> {busy ? 'Reading the photo…' : 'Read from a photo of the label'}
            </span>
          </label>
        </div>
        <form
          className="flex flex-wrap items-end gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            fromText();
          }}
        >
          <Field label="Or type the code (or use a handheld scanner)" className="min-w-0 flex-1" hint="As printed under the code, e.g. (01)09506000134352(17)260900(10)AB-12">
            {(p) => <Input {...p} value={typed} autoComplete="off" onChange={(e) => setTyped(e.target.value)} />}
          </Field>
          <Button type="submit" disabled={!typed.trim()}>
            Use this code
          </Button>
        </form>
      </div>
    </Dialog>
  );
}
