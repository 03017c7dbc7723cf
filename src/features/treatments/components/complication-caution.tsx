import { ShieldAlert } from 'lucide-react';

/**
 * The standing caution on the treatment screen (DESIGN §8): it points to the clinic's own complication protocol
 * and defers to licensed practice. It deliberately gives no doses or emergency instructions.
 */
export function ComplicationCaution() {
  return (
    <aside className="flex gap-3 rounded-lg border border-warn/30 bg-warn-soft px-4 py-3 text-sm leading-relaxed text-ink" aria-label="Complication caution">
      <ShieldAlert className="mt-0.5 size-5 shrink-0 text-warn" aria-hidden />
      <div>
        <p className="font-semibold">If you suspect a complication, stop and follow the clinic’s complication protocol.</p>
        <p className="text-ink-muted">
          Signs such as blanching, a dusky or mottled colour, pain out of proportion, or any change in vision may mean a vascular occlusion and need
          action at once under that protocol. Treatment is given by a suitably qualified, licensed practitioner under local regulation and professional
          guidance; this record does not replace clinical judgement.
        </p>
      </div>
    </aside>
  );
}
