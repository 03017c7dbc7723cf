import { describe, expect, it } from 'vitest';
import { cumulativeTotals, toMilli, treatmentTotals, volumeWarnings, type LineLike } from '../../server/features/treatments/totals.js';
import type { ZoneKey } from '../../server/features/treatments/treatments.schemas.js';

const line = (kind: LineLike['kind'], doses: [ZoneKey, number][]): LineLike => ({ kind, doses: doses.map(([zone, amount]) => ({ zone, amountMilli: toMilli(amount) })) });

describe('treatment totals (worked examples computed by hand)', () => {
  it('adds a session per zone and per visit, exactly', () => {
    // Hand-computed: soft filler 0.1 + 0.2 (upper body), 0.3 (lower body), 0.05 (cupid's bow), 0.15 (upper border) = 0.8 mL;
    // firm filler 0.1 (upper body) + 0.1 (lower body) = 0.2 mL; session 1.0 mL = one 1 mL syringe (FACTS 17, common practice:
    // HA lip filler comes in 1 mL syringes, a session commonly 0.5–1 mL). Upper body 0.1 + 0.2 + 0.1 = 0.4, lower body 0.4.
    const lines = [
      line('filler', [['upper-body', 0.3], ['lower-body', 0.3], ['cupids-bow', 0.05], ['upper-vermilion-border', 0.15]]),
      line('filler', [['upper-body', 0.1], ['lower-body', 0.1]]),
    ];
    // 0.1 + 0.2 in floating point is 0.30000000000000004; stored thousandths keep it at 0.3.
    lines[0].doses[0].amountMilli = toMilli(0.1) + toMilli(0.2);
    const t = treatmentTotals(lines);
    expect(t.fillerMl).toBe(1);
    expect(t.fillerMlByZone).toEqual({ 'upper-body': 0.4, 'lower-body': 0.4, 'cupids-bow': 0.05, 'upper-vermilion-border': 0.15 });
    expect(t.toxinU).toBe(0);
    expect(t.toxinUBySide).toEqual({ right: 0, left: 0 });
  });

  it('keeps toxin in units, per side, apart from filler millilitres', () => {
    // Hand-computed: DAO right 2.5 + 1 = 3.5 U, left 3 U, total 6.5 U; within about 2–5 U per side (FACTS 20, from memory).
    const t = treatmentTotals([line('toxin', [['dao-right', 2.5], ['dao-left', 3]]), line('toxin', [['dao-right', 1]]), line('filler', [['lower-body', 0.5]])]);
    expect(t.toxinU).toBe(6.5);
    expect(t.toxinUBySide).toEqual({ right: 3.5, left: 3 });
    expect(t.toxinUByZone).toEqual({ 'dao-right': 3.5, 'dao-left': 3 });
    expect(t.fillerMl).toBe(0.5);
    expect(t.fillerMlByZone).toEqual({ 'lower-body': 0.5 });
  });

  it('accumulates a patient history in date order whatever order it is given in', () => {
    // Hand-computed: 2025-01-10 1.0 mL; 2025-01-31 (3-week top-up) 0.3 mL → 1.3; 2025-08-01 (maintenance) 0.7 mL → 2.0 mL;
    // upper body 0.4 + 0.1 + 0.3 = 0.8 mL.
    const first = { id: 'a', treatedAt: '2025-01-10T10:00:00.000Z', lines: [line('filler', [['upper-body', 0.4], ['lower-body', 0.6]])] };
    const topUp = { id: 'b', treatedAt: '2025-01-31T10:00:00.000Z', lines: [line('filler', [['upper-body', 0.1], ['cupids-bow', 0.2]])] };
    const later = { id: 'c', treatedAt: '2025-08-01T10:00:00.000Z', lines: [line('filler', [['upper-body', 0.3], ['lower-body', 0.4]]), line('toxin', [['dao-left', 4]])] };
    const { entries, total } = cumulativeTotals([later, first, topUp]);
    expect(entries.map((e) => e.treatmentId)).toEqual(['a', 'b', 'c']);
    expect(entries.map((e) => e.totals.fillerMl)).toEqual([1, 0.3, 0.7]);
    expect(entries.map((e) => e.cumulative.fillerMl)).toEqual([1, 1.3, 2]);
    expect(total.fillerMlByZone).toEqual({ 'upper-body': 0.8, 'lower-body': 1, 'cupids-bow': 0.2 });
    expect(total.toxinUBySide).toEqual({ right: 0, left: 4 });
    expect(cumulativeTotals([]).total.fillerMl).toBe(0);
  });

  it('warns above the high-volume threshold, not at it', () => {
    // A session rarely goes above about 1.5–2 mL (FACTS 17, common practice): the default threshold is "above 2 mL".
    const at = treatmentTotals([line('filler', [['upper-body', 1], ['lower-body', 1]])]);
    const above = treatmentTotals([line('filler', [['upper-body', 1], ['lower-body', 1], ['cupids-bow', 0.05]])]);
    expect(volumeWarnings(at, 2)).toEqual([]);
    const [w] = volumeWarnings(above, 2);
    expect(w).toMatchObject({ code: 'HIGH_VOLUME', fillerMl: 2.05, thresholdMl: 2 });
    expect(volumeWarnings(at, 1.5)).toHaveLength(1);
    // Toxin units never count towards the filler threshold.
    expect(volumeWarnings(treatmentTotals([line('toxin', [['dao-left', 5], ['dao-right', 5]])]), 2)).toEqual([]);
  });
});
