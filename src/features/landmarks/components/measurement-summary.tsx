import { formatAngle, formatArea, formatLength, formatRatio, scaleNote } from '../format';
import type { LipMeasurements, MeasurementsDto } from '../types';

/** One photo's lip measurements as a definition list, with the patient's target beside the ratio. */
export function MeasurementSummary({ m, target }: { m: LipMeasurements; target: MeasurementsDto['target'] }) {
  const sym = (x: number | null) => (x === null ? '—' : `${Math.round(x * 100)} %`);
  const rows: [string, string][] = [
    ['Upper : lower ratio', `${formatRatio(m.ratio)}${target ? ` · target ${target.key === 'custom' ? `1:${target.value}` : target.key}` : ' · no target set'}`],
    ['Upper vermilion height', formatLength(m, m.upperHeight)],
    ['Lower vermilion height', formatLength(m, m.lowerHeight)],
    ['Mouth width', formatLength(m, m.mouthWidth)],
    [
      'Corner angles (right / left)',
      `${formatAngle(m.commissureAngle.right)} / ${formatAngle(m.commissureAngle.left)}${m.commissureAngle.difference !== null ? ` (difference ${formatAngle(m.commissureAngle.difference)})` : ''}`,
    ],
    ["Cupid's bow peaks (right / left)", `${formatLength(m, m.cupidsBow.rightPeakHeight)} / ${formatLength(m, m.cupidsBow.leftPeakHeight)}`],
    ['Peak to peak', formatLength(m, m.cupidsBow.peakToPeak)],
    ['Left/right balance (upper / lower lip)', `${sym(m.upperLip.symmetry)} / ${sym(m.lowerLip.symmetry)}`],
    ['Total vermilion area', formatArea(m, m.totalArea)],
  ];
  return (
    <div>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm" data-testid="measurements">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-muted">{k}</dt>
            <dd className="font-medium tabular-nums text-ink" data-measure={k}>
              {v}
            </dd>
          </div>
        ))}
      </dl>
      <p className="mt-2 text-xs text-ink-faint">
        {m.axis === 'eye-line' ? 'Heights along the face’s vertical (square to the eye line).' : 'Heights square to the line through the lip corners (no eyes on this photo).'}{' '}
        {scaleNote(m)}
      </p>
    </div>
  );
}
