import type { LipMeasurements, MeasurementChange } from './types';

type Length = LipMeasurements['upperHeight'];
type Area = LipMeasurements['totalArea'];
type Change = NonNullable<MeasurementChange['upperHeight']>;

const UNIT_LABEL: Record<LipMeasurements['unit'], string> = { ipd: 'IPD', 'mouth-width': '× mouth width' };

/** "0.10 IPD · ≈ 6.3 mm": relative to the face first; mm only with a scale, marked ≈ when it is the approximate one. */
export function formatLength(m: LipMeasurements, l: Length): string {
  const rel = `${l.rel.toFixed(2)} ${UNIT_LABEL[m.unit]}`;
  if (l.mm === null || !m.scale) return rel;
  return `${rel} · ${m.scale.approximate ? '≈ ' : ''}${l.mm.toFixed(1)} mm`;
}

export function formatArea(m: LipMeasurements, a: Area): string {
  const rel = `${a.rel.toFixed(3)} ${m.unit === 'ipd' ? 'IPD²' : '(mouth width)²'}`;
  if (a.mm2 === null || !m.scale) return rel;
  return `${rel} · ${m.scale.approximate ? '≈ ' : ''}${Math.round(a.mm2)} mm²`;
}

export const formatRatio = (x: number | null) => (x === null ? '—' : `1:${x.toFixed(2)}`);
export const formatAngle = (x: number | null) => (x === null ? '—' : `${x.toFixed(1)}°`);

export function formatChange(c: Change | null, digits = 2): string {
  if (!c) return '—';
  const sign = c.delta > 0 ? '+' : c.delta < 0 ? '−' : '±';
  const pct = c.pct === null ? '' : ` (${c.pct > 0 ? '+' : c.pct < 0 ? '−' : '±'}${Math.abs(c.pct).toFixed(0)} %)`;
  return `${sign}${Math.abs(c.delta).toFixed(digits)}${pct}`;
}

export function scaleNote(m: LipMeasurements): string {
  if (!m.scale) return 'No mm scale: add a ruler of known length to the photo for millimetres.';
  return m.scale.source === 'ruler'
    ? 'Millimetres from the ruler placed on the photo.'
    : 'Millimetres marked ≈ are approximate: they assume an average adult interpupillary distance of 63 mm. Add a ruler for a measured scale.';
}
