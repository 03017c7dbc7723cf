import { useRef, useState } from 'react';
import { ImagePlus, Trash2 } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Dialog } from '../../../components/ui/dialog';
import { Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { referencePictureUrl, useReferencePictures, useRemoveReferencePicture, useUploadReferencePicture, type ReferencePictureView } from '../api/treatments';

/**
 * Pictures the patient brought to show what they like. Kept apart from the clinical photos: they are never part
 * of a comparison, a measurement or a showcase.
 */
export function ReferencePictures({ patientId, visitId }: { patientId: string; visitId: string }) {
  const list = useReferencePictures(patientId);
  const upload = useUploadReferencePicture(patientId);
  const remove = useRemoveReferencePicture(patientId);
  const input = useRef<HTMLInputElement>(null);
  const [caption, setCaption] = useState('');
  const [open, setOpen] = useState<ReferencePictureView | null>(null);
  return (
    <section aria-label="The patient's reference pictures" className="space-y-3 border-t border-line pt-5">
      <div>
        <h3 className="text-lg font-semibold">The patient’s reference pictures</h3>
        <p className="text-sm text-ink-faint">Pictures the patient brought to show what they like. They stay apart from clinical photos and are never compared or shown.</p>
      </div>
      {list.data && list.data.length > 0 && (
        <ul className="flex flex-wrap gap-3">
          {list.data.map((p) => (
            <li key={p.id} className="w-36">
              <button type="button" onClick={() => setOpen(p)} className="block w-full overflow-hidden rounded-lg border border-line bg-paper-sunk" aria-label={`Open reference picture${p.caption ? `: ${p.caption}` : ''}`}>
                <img src={referencePictureUrl(p.id, 'thumb')} alt="" className="aspect-square w-full object-cover" />
              </button>
              {p.caption && <p className="mt-1 line-clamp-2 text-sm text-ink-muted">{p.caption}</p>}
            </li>
          ))}
        </ul>
      )}
      <div className="flex flex-wrap items-end gap-2">
        <Input aria-label="Caption for the next picture" placeholder="Caption (optional)" className="max-w-xs" value={caption} onChange={(e) => setCaption(e.target.value)} />
        <input
          ref={input}
          type="file"
          accept="image/jpeg,image/png,image/webp"
          className="hidden"
          onChange={(e) => {
            const file = e.target.files?.[0];
            e.target.value = '';
            if (file) upload.mutate({ file, caption, visitId }, { onSuccess: () => setCaption('') });
          }}
        />
        <Button busy={upload.isPending} onClick={() => input.current?.click()}>
          <ImagePlus className="size-4" /> Add a reference picture
        </Button>
      </div>
      {upload.error && <Notice tone="danger">{upload.error.message}</Notice>}
      <Dialog open={Boolean(open)} onClose={() => setOpen(null)} title={open?.caption || 'Reference picture'} className="w-[min(56rem,calc(100vw-2rem))]">
        {open && (
          <div className="space-y-3">
            <img src={referencePictureUrl(open.id, 'display')} alt={open.caption || 'Reference picture'} className="mx-auto max-h-[60dvh] rounded-lg" />
            <div className="flex justify-end">
              <Button variant="danger" busy={remove.isPending} onClick={() => remove.mutate(open.id, { onSuccess: () => setOpen(null) })}>
                <Trash2 className="size-4" /> Remove from the record
              </Button>
            </div>
          </div>
        )}
      </Dialog>
    </section>
  );
}
