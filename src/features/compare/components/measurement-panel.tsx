import { Info } from 'lucide-react';
import { cn } from '../../../lib/cn';
import type { LipMeasurements, PairComparison } from '../types';

export const ratioText = (x: number | null | undefined, digits = 1) => (x === null || x === undefined ? '—' : `1:${x.toFixed(digits)}`);

type Change = { from: number; to: number; delta: number; pct: number | null } | null | undefined;

const signed = (v: number, digits: number) => `${v > 0 ? '+' : v < 0 ? '−' : '±'}${Math.abs(v).toFixed(digits)}`;
const pctText = (c: Change) => (c && c.pct !== null ? `${signed(c.pct, 0)} %` : '—');

interface Row {
  label: string;
  value: (m: LipMeasurements) => string;
  change: string;
}

/**
 * The measurement panel of a pair: both values, the change, and the patient's target ratio beside the ratio, with
 * the caution that these are guides (DESIGN §8). Lengths in mm only when both photos have a scale, and labelled
 * approximate when that scale comes from an average eye distance.
 */
export function MeasurementPanel({ pair, tone = 'light', className }: { pair: PairComparison; tone?: 'light' | 'dark'; className?: string }) {
  const dark = tone === 'dark';
  const a = pair.baseline.measurements;
  const b = pair.followUp.measurements;
  const head = cn('text-left text-xs font-medium', dark ? 'text-white/75' : 'text-ink-muted');
  if (!pair.view.measured || !a || !b) {
    return (
      <section aria-label="Measurements" className={cn('space-y-2 text-sm', dark ? 'text-white/85' : 'text-ink-muted', className)}>
        <h3 className={cn('text-lg font-semibold', dark ? 'text-white' : 'text-ink')}>Measurements</h3>
        <p>
          {!pair.view.measured
            ? 'Lip measurements are taken on the frontal at-rest and lips close-up views.'
            : 'Measurements need the lip landmarks of both photos; place them on the photo that has none.'}
        </p>
        <Caution text={pair.caution} dark={dark} />
      </section>
    );
  }
  const mm = !!(a.scale && b.scale && pair.change?.mm);
  const approx = mm && (a.scale!.approximate || b.scale!.approximate);
  const unit = a.unit === 'ipd' ? '× eye distance' : '× mouth width';
  const len = (l: { rel: number; mm: number | null }) => (mm && l.mm !== null ? `${l.mm.toFixed(1)} mm` : `${l.rel.toFixed(3)} ${unit}`);
  const area = (x: { rel: number; mm2: number | null }) => (mm && x.mm2 !== null ? `${Math.round(x.mm2)} mm²` : `${x.rel.toFixed(4)}`);
  const c = pair.change;
  const rows: Row[] = [
    { label: 'Upper lip height', value: (m) => len(m.upperHeight), change: mm ? `${signed(c!.mm!.upperHeight.delta, 1)} mm` : pctText(c?.upperHeight) },
    { label: 'Lower lip height', value: (m) => len(m.lowerHeight), change: mm ? `${signed(c!.mm!.lowerHeight.delta, 1)} mm` : pctText(c?.lowerHeight) },
    { label: 'Mouth width', value: (m) => len(m.mouthWidth), change: mm ? `${signed(c!.mm!.mouthWidth.delta, 1)} mm` : pctText(c?.mouthWidth) },
    { label: 'Total vermilion area', value: (m) => area(m.totalArea), change: pctText(c?.totalArea) },
  ];
  return (
    <section aria-label="Measurements" className={cn('space-y-3', className)}>
      <h3 className={cn('text-lg font-semibold', dark ? 'text-white' : 'text-ink')}>Measurements</h3>
      <div className={cn('grid grid-cols-[1fr_auto] items-end gap-x-4 rounded-lg px-4 py-3', dark ? 'bg-black/35' : 'bg-paper-sunk')}>
        <div>
          <p className={cn('text-sm', dark ? 'text-white/80' : 'text-ink-muted')}>Upper : lower lip</p>
          <p className={cn('font-display text-3xl font-semibold tabular-nums', dark ? 'text-white' : 'text-ink')}>
            {ratioText(a.ratio)} <span aria-hidden>→</span>
            <span className="sr-only"> to </span> {ratioText(b.ratio)}
          </p>
        </div>
        <div className="text-right">
          <p className={cn('text-sm', dark ? 'text-white/80' : 'text-ink-muted')}>Target</p>
          <p className={cn('text-xl font-semibold tabular-nums', dark ? 'text-white' : 'text-ink')}>{pair.target ? ratioText(pair.target.value) : 'Not set'}</p>
        </div>
      </div>
      <table className={cn('w-full text-sm tabular-nums', dark ? 'text-white' : 'text-ink')}>
        <thead>
          <tr className={cn('border-b', dark ? 'border-white/20' : 'border-line')}>
            <th scope="col" className={head}>
              <span className="sr-only">Measurement</span>
            </th>
            <th scope="col" className={head}>
              Baseline
            </th>
            <th scope="col" className={head}>
              Follow-up
            </th>
            <th scope="col" className={head}>
              Change
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.label} className={cn('border-b last:border-0', dark ? 'border-white/10' : 'border-line')}>
              <th scope="row" className={cn('py-1.5 pr-2 text-left font-normal', dark ? 'text-white/85' : 'text-ink-muted')}>
                {r.label}
              </th>
              <td className="py-1.5 pr-2">{r.value(a)}</td>
              <td className="py-1.5 pr-2">{r.value(b)}</td>
              <td className="py-1.5 font-semibold">{r.change}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {approx && <p className={cn('text-xs', dark ? 'text-white/75' : 'text-ink-faint')}>mm are approximate: the scale comes from an average adult eye distance (about 63 mm), not from a ruler in the photo.</p>}
      <Caution text={pair.caution} dark={dark} />
    </section>
  );
}

function Caution({ text, dark }: { text: string; dark: boolean }) {
  return (
    <p className={cn('flex gap-2 text-sm', dark ? 'text-white/85' : 'text-ink-muted')}>
      <Info className="mt-0.5 size-4 shrink-0" aria-hidden />
      <span>Results vary from person to person. {text}</span>
    </p>
  );
}
