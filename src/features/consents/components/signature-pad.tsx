import { forwardRef, useImperativeHandle, useRef, useState } from 'react';
import SignatureCanvas from 'react-signature-canvas';
import { Eraser, Undo2 } from 'lucide-react';
import { Button } from '../../../components/ui/button';

export interface SignaturePadHandle {
  /** The drawing as a PNG data URL, or null when nothing is drawn. */
  toPng(): string | null;
  clear(): void;
}

/** Finger, stylus or mouse signature with clear and undo; the server checks again that there is ink. */
export const SignaturePad = forwardRef<SignaturePadHandle, { label: string; onChange?: (empty: boolean) => void; invalid?: boolean }>(function SignaturePad({ label, onChange, invalid }, ref) {
  const pad = useRef<SignatureCanvas>(null);
  const [empty, setEmpty] = useState(true);
  const update = () => {
    const e = pad.current?.isEmpty() ?? true;
    setEmpty(e);
    onChange?.(e);
  };
  useImperativeHandle(ref, () => ({
    toPng: () => (pad.current && !pad.current.isEmpty() ? pad.current.toDataURL('image/png') : null),
    clear: () => {
      pad.current?.clear();
      update();
    },
  }));
  const undo = () => {
    const data = pad.current?.toData() ?? [];
    data.pop();
    pad.current?.fromData(data);
    update();
  };
  return (
    <div>
      <div className={`relative rounded-xl border-2 bg-white ${invalid ? 'border-danger' : 'border-line-strong'}`}>
        <SignatureCanvas
          ref={pad}
          penColor="#1f1c19"
          minWidth={1.2}
          maxWidth={3.2}
          clearOnResize={false}
          onEnd={update}
          canvasProps={{ className: 'block h-52 w-full touch-none rounded-xl', 'aria-label': label, role: 'img' }}
        />
        {empty && <span className="pointer-events-none absolute inset-x-0 bottom-10 text-center text-ink-faint">Sign here with your finger</span>}
        <span className="pointer-events-none absolute inset-x-6 bottom-8 border-b border-dashed border-line-strong" aria-hidden />
      </div>
      <div className="mt-2 flex gap-2">
        <Button size="sm" variant="ghost" onClick={undo} disabled={empty}>
          <Undo2 className="size-4" aria-hidden /> Undo last stroke
        </Button>
        <Button size="sm" variant="ghost" onClick={() => ref && pad.current && (pad.current.clear(), update())} disabled={empty}>
          <Eraser className="size-4" aria-hidden /> Clear and sign again
        </Button>
      </div>
    </div>
  );
});
