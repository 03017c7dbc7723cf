/**
 * Usual amounts per zone in one session, by product kind: a typing check, not a dose recommendation. Above the band
 * the record warns and still saves (never a block); the clinician decides. Every figure is common practice of the
 * trade, from memory, not from one published source: FACTS 17 (HA lip filler, about 0.5–1.5 mL a session) and
 * FACTS 20 (neuromodulator into the depressor anguli oris, about 2–5 units per side, from memory). Neuromodulator
 * bands are in the units of the common type A products; other products' units differ (product labelling, FACTS 28),
 * which the warning says.
 */
import type { LineKind, ZoneKey } from './treatments.schemas.js';

export interface Band {
  /** The usual most for one zone in one session, in the line's unit. */
  max: number;
}

export const PLAUSIBILITY: Record<LineKind, Partial<Record<ZoneKey, Band>>> = {
  filler: {
    'upper-vermilion-border-right': { max: 0.3 },
    'upper-vermilion-border-left': { max: 0.3 },
    'lower-vermilion-border-right': { max: 0.3 },
    'lower-vermilion-border-left': { max: 0.3 },
    'upper-body-right': { max: 0.5 },
    'upper-body-left': { max: 0.5 },
    'lower-body-right': { max: 0.5 },
    'lower-body-left': { max: 0.5 },
    'cupids-bow': { max: 0.2 },
    'philtral-column-right': { max: 0.15 },
    'philtral-column-left': { max: 0.15 },
    'wet-dry-border-upper': { max: 0.3 },
    'wet-dry-border-lower': { max: 0.3 },
    'oral-commissure-right': { max: 0.3 },
    'oral-commissure-left': { max: 0.3 },
    'perioral-lines-upper': { max: 0.5 },
    'perioral-lines-lower': { max: 0.5 },
    'marionette-right': { max: 1 },
    'marionette-left': { max: 1 },
    'pre-jowl-sulcus-right': { max: 1 },
    'pre-jowl-sulcus-left': { max: 1 },
    chin: { max: 2 },
    // Whole-lip zones of older records: both sides together.
    'upper-vermilion-border': { max: 0.6 },
    'lower-vermilion-border': { max: 0.6 },
    'upper-body': { max: 1 },
    'lower-body': { max: 1 },
  },
  toxin: {
    'dao-right': { max: 5 },
    'dao-left': { max: 5 },
    mentalis: { max: 10 },
    'orbicularis-oris': { max: 6 },
  },
};

export interface PlausibilityWarning {
  code: 'UNUSUAL_ZONE_AMOUNT';
  line: number;
  zone: ZoneKey;
  amount: number;
  usualMax: number;
  message: string;
}

/** Warnings for zones above their usual band (never a refusal). `label` names a zone for the message. */
export function plausibilityWarnings(
  lines: { kind: LineKind; unit: 'mL' | 'U'; unitLabel?: string | null; doses: { zone: ZoneKey; amount: number }[] }[],
  label: (zone: ZoneKey) => string,
): PlausibilityWarning[] {
  const out: PlausibilityWarning[] = [];
  lines.forEach((l, i) => {
    for (const d of l.doses) {
      const band = PLAUSIBILITY[l.kind][d.zone];
      if (!band || d.amount <= band.max + 1e-9) continue;
      const unit = l.unit === 'U' ? (l.unitLabel ?? 'U') : 'mL';
      const note = l.kind === 'toxin' ? ' (in the units of common type A products; this product’s units may differ)' : '';
      out.push({
        code: 'UNUSUAL_ZONE_AMOUNT',
        line: i,
        zone: d.zone,
        amount: d.amount,
        usualMax: band.max,
        message: `Line ${i + 1}: ${d.amount} ${unit} into ${label(d.zone)} is more than is usual in one session (up to about ${band.max}${l.unit === 'U' ? ' U' : ' mL'}${note}). Check the amount; it is recorded as entered.`,
      });
    }
  });
  return out;
}
