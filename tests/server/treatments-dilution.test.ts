import { describe, expect, it } from 'vitest';
import { unitsPerMl, unitsPerTenthMl, volumeForUnits } from '../../server/features/treatments/dilution.js';

describe('reconstitution arithmetic (hand-computed)', () => {
  it('gives 4 U per 0.1 mL for 100 U in 2.5 mL (FACTS 28, arithmetic)', () => {
    expect(unitsPerMl(100, 2.5)).toBe(40);
    expect(unitsPerTenthMl(100, 2.5)).toBe(4);
  });

  it('works for other vials and volumes', () => {
    // 100 U in 1 mL: 100 U/mL, 10 U per 0.1 mL; 50 U in 1.25 mL: 40 U/mL, 4 U per 0.1 mL; 300 U in 1.5 mL: 20 U per 0.1 mL.
    expect(unitsPerTenthMl(100, 1)).toBe(10);
    expect(unitsPerTenthMl(50, 1.25)).toBe(4);
    expect(unitsPerTenthMl(300, 1.5)).toBe(20);
    // 100 U in 3 mL: 33.33… U/mL, 3.33 U per 0.1 mL (rounded to 0.01 U).
    expect(unitsPerTenthMl(100, 3)).toBe(3.33);
  });

  it('gives the volume to draw for a number of units', () => {
    // 3 U at 40 U/mL = 0.075 mL; 2.5 U at 100 U/mL = 0.025 mL.
    expect(volumeForUnits(3, 100, 2.5)).toBe(0.075);
    expect(volumeForUnits(2.5, 100, 1)).toBe(0.025);
  });

  it('refuses a zero or negative vial or diluent', () => {
    expect(() => unitsPerMl(100, 0)).toThrow(RangeError);
    expect(() => unitsPerMl(0, 2.5)).toThrow(RangeError);
  });
});
