import type { FILLER_ZONES, ProductKind, TOXIN_ZONES, ZoneKey } from '../../../server/features/treatments/treatments.schemas';

export type { ProductKind, ZoneKey };

/** The diagram's zones in table order. Typed against the API's lists so the two cannot drift apart. */
export const FILLER_ZONE_KEYS: typeof FILLER_ZONES = [
  'upper-vermilion-border',
  'lower-vermilion-border',
  'upper-body',
  'lower-body',
  'cupids-bow',
  'philtral-column-right',
  'philtral-column-left',
  'wet-dry-border-upper',
  'wet-dry-border-lower',
  'oral-commissure-right',
  'oral-commissure-left',
];
export const TOXIN_ZONE_KEYS: typeof TOXIN_ZONES = ['dao-right', 'dao-left'];
export const ZONES_OF_KIND: Record<ProductKind, readonly ZoneKey[]> = { filler: FILLER_ZONE_KEYS, toxin: TOXIN_ZONE_KEYS };

export const ZONE_LABELS: Record<ZoneKey, string> = {
  'upper-vermilion-border': 'Upper vermilion border',
  'lower-vermilion-border': 'Lower vermilion border',
  'upper-body': 'Upper lip body',
  'lower-body': 'Lower lip body',
  'cupids-bow': "Cupid's bow",
  'philtral-column-right': 'Philtral column (right)',
  'philtral-column-left': 'Philtral column (left)',
  'wet-dry-border-upper': 'Wet–dry border, upper',
  'wet-dry-border-lower': 'Wet–dry border, lower',
  'oral-commissure-right': 'Oral commissure (right)',
  'oral-commissure-left': 'Oral commissure (left)',
  'dao-right': 'Depressor anguli oris (right)',
  'dao-left': 'Depressor anguli oris (left)',
};

/** Tap steps offered per kind: 0.05–0.2 mL of filler, 0.5–2 U of toxin. */
export const STEPS: Record<ProductKind, number[]> = { filler: [0.05, 0.1, 0.2], toxin: [0.5, 1, 2] };
export const DEFAULT_STEP: Record<ProductKind, number> = { filler: 0.1, toxin: 1 };
