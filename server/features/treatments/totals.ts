import { AMOUNT_SCALE, type ProductKind, type ZoneKey } from './treatments.schemas.js';

/** Pure treatment arithmetic: no I/O, shared by the API, the clinic day and the tests. */

export interface DoseLike {
  zone: ZoneKey;
  /** Thousandths of the line's unit. */
  amountMilli: number;
}
export interface LineLike {
  kind: ProductKind;
  doses: DoseLike[];
}
export interface TreatmentLike {
  id: string;
  treatedAt: string;
  lines: LineLike[];
}

/** Amounts of one treatment (or a sum of treatments), in mL for filler and U for toxin. */
export interface Totals {
  fillerMl: number;
  toxinU: number;
  fillerMlByZone: Partial<Record<ZoneKey, number>>;
  toxinUByZone: Partial<Record<ZoneKey, number>>;
  /** Toxin per side of the patient (DESIGN §7: units of toxin per side). */
  toxinUBySide: { right: number; left: number };
}

export const toMilli = (amount: number): number => Math.round(amount * AMOUNT_SCALE);
export const fromMilli = (milli: number): number => milli / AMOUNT_SCALE;

function sideOf(zone: ZoneKey): 'right' | 'left' | null {
  if (zone.endsWith('-right')) return 'right';
  if (zone.endsWith('-left')) return 'left';
  return null;
}

interface MilliTotals {
  filler: number;
  toxin: number;
  fillerByZone: Map<ZoneKey, number>;
  toxinByZone: Map<ZoneKey, number>;
}

function addLines(acc: MilliTotals, lines: LineLike[]): MilliTotals {
  for (const line of lines) {
    const byZone = line.kind === 'filler' ? acc.fillerByZone : acc.toxinByZone;
    for (const d of line.doses) {
      byZone.set(d.zone, (byZone.get(d.zone) ?? 0) + d.amountMilli);
      if (line.kind === 'filler') acc.filler += d.amountMilli;
      else acc.toxin += d.amountMilli;
    }
  }
  return acc;
}

const emptyMilli = (): MilliTotals => ({ filler: 0, toxin: 0, fillerByZone: new Map(), toxinByZone: new Map() });

function finish(m: MilliTotals): Totals {
  const toxinUByZone = Object.fromEntries([...m.toxinByZone].map(([z, v]) => [z, fromMilli(v)]));
  let right = 0;
  let left = 0;
  for (const [z, v] of m.toxinByZone) {
    if (sideOf(z) === 'right') right += v;
    if (sideOf(z) === 'left') left += v;
  }
  return {
    fillerMl: fromMilli(m.filler),
    toxinU: fromMilli(m.toxin),
    fillerMlByZone: Object.fromEntries([...m.fillerByZone].map(([z, v]) => [z, fromMilli(v)])),
    toxinUByZone,
    toxinUBySide: { right: fromMilli(right), left: fromMilli(left) },
  };
}

/** Totals per zone and per visit of one treatment's lines. Sums are exact (integer thousandths). */
export function treatmentTotals(lines: LineLike[]): Totals {
  return finish(addLines(emptyMilli(), lines));
}

/** Per line: total of the line in its own unit. */
export function lineTotal(line: LineLike): number {
  return fromMilli(line.doses.reduce((n, d) => n + d.amountMilli, 0));
}

export interface CumulativeEntry {
  treatmentId: string;
  treatedAt: string;
  totals: Totals;
  /** Everything up to and including this treatment. */
  cumulative: Totals;
}

/**
 * A patient's history: each treatment's totals and the running totals in date order, oldest first.
 * The last entry's `cumulative` is the patient's total to date.
 */
export function cumulativeTotals(treatments: TreatmentLike[]): { entries: CumulativeEntry[]; total: Totals } {
  const ordered = [...treatments].sort((a, b) => (a.treatedAt < b.treatedAt ? -1 : a.treatedAt > b.treatedAt ? 1 : a.id.localeCompare(b.id)));
  const running = emptyMilli();
  const entries = ordered.map((t) => {
    addLines(running, t.lines);
    return { treatmentId: t.id, treatedAt: t.treatedAt, totals: treatmentTotals(t.lines), cumulative: finish(running) };
  });
  return { entries, total: finish(running) };
}

export interface VolumeWarning {
  code: 'HIGH_VOLUME';
  message: string;
  fillerMl: number;
  thresholdMl: number;
}

/**
 * A warning (never a refusal) when one session's filler volume is above the clinic's threshold.
 * A session commonly uses about 0.5–1 mL, up to about 1.5–2 mL (FACTS 17, common practice).
 */
export function volumeWarnings(totals: Totals, thresholdMl: number): VolumeWarning[] {
  if (toMilli(totals.fillerMl) <= toMilli(thresholdMl)) return [];
  return [
    {
      code: 'HIGH_VOLUME',
      message: `This session's filler volume (${totals.fillerMl} mL) is above the clinic's threshold of ${thresholdMl} mL. Check the amounts, and consider staging the treatment over more than one visit.`,
      fillerMl: totals.fillerMl,
      thresholdMl,
    },
  ];
}
