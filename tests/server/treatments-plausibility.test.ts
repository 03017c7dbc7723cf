import { describe, expect, it } from 'vitest';
import { PLAUSIBILITY, plausibilityWarnings } from '../../server/features/treatments/plausibility.js';
import { ACCEPTED_ZONES_OF_KIND, ZONE_LABELS, ZONES_OF_KIND, type ZoneKey } from '../../server/features/treatments/treatments.schemas.js';

const label = (z: ZoneKey) => ZONE_LABELS[z];

describe('usual amounts per zone (one table, common practice)', () => {
  it('has a band for every zone a line of each kind may hold, and none for the other kind', () => {
    for (const kind of ['filler', 'toxin'] as const) {
      expect(Object.keys(PLAUSIBILITY[kind]).sort()).toEqual([...ACCEPTED_ZONES_OF_KIND[kind]].sort());
    }
    expect(ZONES_OF_KIND.toxin).toEqual(['dao-right', 'dao-left', 'mentalis', 'orbicularis-oris']);
  });

  it('warns for 20 U per side into the depressor anguli oris and not for 3 U (FACTS 20: about 2–5 U per side, from memory)', () => {
    const toxin = (amount: number) => ({ kind: 'toxin' as const, unit: 'U' as const, unitLabel: 'Testvale units', doses: [{ zone: 'dao-right' as ZoneKey, amount }, { zone: 'dao-left' as ZoneKey, amount }] });
    expect(plausibilityWarnings([toxin(3)], label)).toEqual([]);
    expect(plausibilityWarnings([toxin(5)], label)).toEqual([]);
    const w = plausibilityWarnings([toxin(20)], label);
    expect(w.map((x) => [x.zone, x.amount, x.usualMax])).toEqual([
      ['dao-right', 20, 5],
      ['dao-left', 20, 5],
    ]);
    expect(w[0].message).toMatch(/^Line 1: 20 Testvale units into Depressor anguli oris \(right\) is more than is usual/);
    expect(w[0].message).toMatch(/this product’s units may differ/);
  });

  it('warns per zone for filler, lower face included, and names the line', () => {
    const lines = [
      { kind: 'filler' as const, unit: 'mL' as const, doses: [{ zone: 'upper-body-left' as ZoneKey, amount: 0.3 }] },
      { kind: 'filler' as const, unit: 'mL' as const, doses: [{ zone: 'chin' as ZoneKey, amount: 2.5 }, { zone: 'marionette-right' as ZoneKey, amount: 0.8 }] },
    ];
    expect(plausibilityWarnings(lines, label).map((w) => [w.line, w.zone])).toEqual([[1, 'chin']]);
  });
});
